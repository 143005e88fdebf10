/**
 * Tauline's bench runner. `npm run bench` runs every part; `npm run bench -- --only engine` (or a comma list) runs
 * some. Parts are modules exporting `run(ctx)` that resolve to a plain object of figures. Progress goes to stderr;
 * the LAST line on stdout is one JSON object keyed by part name, also written to .bench/results.json.
 * To add a part: write tests/bench/<part>.ts and add a line to `parts` below. The parts' PostgreSQL (.bench/pg) is stopped
 * at the end unless BENCH_KEEP_PG=1.
 */
import { createWriteStream, existsSync, mkdirSync, readFileSync, renameSync, statSync, writeFileSync } from "node:fs";
import { once } from "node:events";
import { join, resolve } from "node:path";
import { execFileSync, spawn } from "node:child_process";
import { fileURLToPath } from "node:url";
import { demoMooringDefaults, mooringCsv, type MooringOptions } from "../../shared/demo/generate";

export interface BenchContext {
  /** Absolute path of the git-ignored .bench folder. */
  dir: string;
  /** Path to the month-at-1-Hz demo mooring CSV, generated on first use and reused afterwards. */
  mooringCsv(): Promise<string>;
  /** Options the mooring CSV was generated with. */
  mooringOptions: MooringOptions;
  log(message: string): void;
}

export type BenchPart = { run(ctx: BenchContext): Promise<Record<string, number | string>> };

/** Part name → lazy import. */
export const parts: Record<string, () => Promise<BenchPart>> = {
  engine: () => import("./engine"),
  pipeline: () => import("./pipeline"),
  plot: () => import("./plot"),
  upload: () => import("./upload"),
  download: () => import("./download"),
  catalogue: () => import("./catalogue"),
};

const dir = resolve(".bench");
const mooringOptions: MooringOptions = { ...demoMooringDefaults, intervalS: 1, durationS: 31 * 86400 };
const log = (m: string) => process.stderr.write(`[bench] ${m}\n`);

async function mooringCsvPath(): Promise<string> {
  const tag = `mooring-1hz-${mooringOptions.seed}-${mooringOptions.durationS}`;
  const path = join(dir, `${tag}.csv`);
  if (existsSync(path)) return path;
  log(`generating ${path} (once; later runs reuse it)`);
  const tmp = `${path}.partial`;
  const out = createWriteStream(tmp);
  for (const piece of mooringCsv(mooringOptions, 20_000)) if (!out.write(piece)) await once(out, "drain");
  out.end();
  await once(out, "finish");
  renameSync(tmp, path);
  log(`wrote ${(statSync(path).size / 1e6).toFixed(0)} MB`);
  return path;
}

/** Runs one part as `run.ts --only NAME` in a child process; its last stdout line is the figures. */
async function runAlone(name: string): Promise<unknown> {
  const child = spawn(process.execPath, ["--import", "tsx", fileURLToPath(import.meta.url), "--only", name], { stdio: ["ignore", "pipe", "inherit"] });
  let out = "";
  child.stdout.on("data", (b) => (out += b));
  const [code] = (await once(child, "exit")) as [number | null];
  const last = out.trim().split("\n").pop() ?? "";
  if (code !== 0 || !last.startsWith("{")) throw new Error(`bench part ${name} failed (exit ${code})`);
  return (JSON.parse(last) as Record<string, unknown>)[name];
}

async function main() {
  const args = process.argv.slice(2);
  const i = args.indexOf("--only");
  const only = i >= 0 ? (args[i + 1] ?? "").split(",").filter(Boolean) : Object.keys(parts);
  const unknown = only.filter((p) => !(p in parts));
  if (unknown.length) {
    process.stderr.write(`unknown bench part(s): ${unknown.join(", ")}; known: ${Object.keys(parts).join(", ")}\n`);
    process.exit(2);
  }
  mkdirSync(dir, { recursive: true });
  const ctx: BenchContext = { dir, mooringCsv: mooringCsvPath, mooringOptions, log };
  const results: Record<string, unknown> = {};
  if (only.length === 1) {
    const name = only[0]!;
    log(`running ${name}`);
    const part = await parts[name]!();
    results[name] = await part.run(ctx);
  } else {
    // Each part in a process of its own: parts end the shared database pool and set their own environment, so
    // one part's module state must never reach the next.
    for (const name of only) results[name] = await runAlone(name);
  }
  const file = join(dir, "results.json");
  let previous: Record<string, unknown> = {};
  try {
    previous = JSON.parse(readFileSync(file, "utf8")) as Record<string, unknown>;
  } catch {
    previous = {};
  }
  // Keep figures of parts not run this time, so --only refreshes one part.
  writeFileSync(file, JSON.stringify({ ...previous, ...results }, null, 2) + "\n");
  process.stdout.write(JSON.stringify(results) + "\n");
  // The parts' private PostgreSQL (.bench/pg) is stopped at the end, so a bench leaves nothing running;
  // BENCH_KEEP_PG=1 keeps it for looking at the data afterwards.
  if (process.env.BENCH_KEEP_PG !== "1") execFileSync("bash", ["scripts/pg.sh", "stop", join(dir, "pg")], { stdio: "inherit" });
}

await main();
