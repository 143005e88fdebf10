/**
 * Bench part "download" (issue 8): the CSV download of a ~2.7-million-row version (the month-at-1-Hz demo mooring)
 * over HTTP, against a raw `COPY (same rows, same columns) TO STDOUT WITH (FORMAT csv)` read straight from
 * PostgreSQL, in the same run, alternating. Figures: csv_mb_per_s and copy_mb_per_s (medians of three rounds) and ratio
 * (median of the three rounds' csv/copy ratios; goal ≥ 0.7).
 *
 * The work runs in a child process (this file with --child) so its database pool and environment never meet
 * other parts'. It shares the plot part's database and version ("Bench plot month"), building it once if absent.
 */
import { spawn } from "node:child_process";
import type { AddressInfo } from "node:net";
import { resolve } from "node:path";
import { performance } from "node:perf_hooks";
import { Writable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { to as copyTo } from "pg-copy-streams";
import { adminCookie, monthVersion } from "./lib/month-version";
import type { BenchContext } from "./run";
import { columnSql } from "../../server/db/record-flags";

const ROUNDS = 3;
/** Prefix of the child's result line on stdout. */
export const RESULT_MARK = "BENCH_RESULT ";

/** Runs the measurement in a child process and returns its figures (last stdout line). */
export function runChild(file: string, ctx: BenchContext, env: Record<string, string> = {}): Promise<Record<string, number | string>> {
  return new Promise((resolvePromise, reject) => {
    // BENCH_PROFILE=DIR writes a CPU profile of the child (the server side) into DIR.
    const profile = process.env.BENCH_PROFILE ? ["--cpu-prof", `--cpu-prof-dir=${process.env.BENCH_PROFILE}`] : [];
    const child = spawn(process.execPath, [...profile, "--import", "tsx", file, "--child"], { env: { ...process.env, BENCH_DIR: ctx.dir, ...env }, stdio: ["ignore", "pipe", "inherit"] });
    let out = "";
    child.stdout.on("data", (b) => (out += b));
    child.on("exit", (code) => {
      if (code !== 0) return reject(new Error(`${file} exited with ${code}`));
      // The figures come on a marked line: the app's own log lines may share stdout.
      const line = out.split("\n").findLast((l) => l.startsWith(RESULT_MARK));
      if (!line) return reject(new Error(`${file} printed no result`));
      resolvePromise(JSON.parse(line.slice(RESULT_MARK.length)));
    });
  });
}

export async function run(ctx: BenchContext) {
  await ctx.mooringCsv();
  return runChild(resolve("tests/bench/download.ts"), ctx);
}

const log = (m: string) => process.stderr.write(`[bench] download: ${m}\n`);

async function child() {
  const { version, pool } = await monthVersion(process.env.BENCH_DIR!);
  const { createApp } = await import("../../server/app");
  const { planVersion, downloadSql } = await import("../../server/services/downloads");
  const { downloadQuerySchema } = await import("../../shared/schemas/downloads");
  const server = createApp({ serveClient: false }).listen(0, "127.0.0.1");
  await new Promise((r) => server.once("listening", r));
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const cookie = await adminCookie(base, pool);

  const plan = await planVersion(version.id, downloadQuerySchema.parse({}));
  const cols = ["time", ...plan.variables.flatMap((v) => [`"${v.name}"`, columnSql(`${v.name}_qc`)])].join(", ");
  const n = version.number;
  const rawSql = `COPY (select ${cols} from records where dataset_id = '${version.dataset_id}' and valid_from <= ${n} and (valid_to is null or valid_to > ${n}) order by platform, time) TO STDOUT WITH (FORMAT csv, HEADER true)`;
  // Sanity: the download's own SELECT reads the same rows.
  if (!downloadSql(plan, "csv").includes("order by platform, time")) throw new Error("download order changed");

  const sink = () => {
    let bytes = 0;
    return { w: new Writable({ write: (c: Buffer, _e, cb) => ((bytes += c.length), cb()) }), bytes: () => bytes };
  };
  const copyOnce = async () => {
    const c = await pool.connect();
    const s = sink();
    const t = performance.now();
    await pipeline(c.query(copyTo(rawSql)), s.w);
    const ms = performance.now() - t;
    c.release();
    return { mb: s.bytes() / 1e6, s: ms / 1000 };
  };
  const csvOnce = async () => {
    const t = performance.now();
    const res = await fetch(`${base}/api/v1/versions/${version.id}/download?format=csv`, { headers: { cookie } });
    if (!res.ok || !res.body) throw new Error(`download ${res.status}`);
    let bytes = 0;
    let lines = 0;
    for await (const chunk of res.body as unknown as AsyncIterable<Uint8Array>) {
      bytes += chunk.length;
      for (let i = 0; i < chunk.length; i++) if (chunk[i] === 10) lines++;
    }
    const ms = performance.now() - t;
    return { mb: bytes / 1e6, s: ms / 1000, rows: lines - 1 };
  };
  const csvRuns: { mb: number; s: number; rows: number }[] = [];
  const copyRuns: { mb: number; s: number }[] = [];
  for (let i = 0; i < ROUNDS; i++) {
    copyRuns.push(await copyOnce());
    csvRuns.push(await csvOnce());
    log(`round ${i + 1}: csv ${(csvRuns[i]!.mb / csvRuns[i]!.s).toFixed(1)} MB/s (${csvRuns[i]!.mb.toFixed(0)} MB), copy ${(copyRuns[i]!.mb / copyRuns[i]!.s).toFixed(1)} MB/s (${copyRuns[i]!.mb.toFixed(0)} MB)`);
  }
  // Medians: on a shared machine one lucky round of either side would decide a best-of ratio.
  const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
  const csv = median(csvRuns.map((x) => x.mb / x.s));
  const copy = median(copyRuns.map((x) => x.mb / x.s));
  const ratio = median(csvRuns.map((x, i) => x.mb / x.s / (copyRuns[i]!.mb / copyRuns[i]!.s)));
  server.closeAllConnections();
  await new Promise((r) => server.close(r));
  await pool.end();
  const figures = {
    rows: csvRuns[0]!.rows,
    csv_mb: Number(csvRuns[0]!.mb.toFixed(1)),
    csv_mb_per_s: Number(csv.toFixed(1)),
    copy_mb_per_s: Number(copy.toFixed(1)),
    ratio: Number(ratio.toFixed(2)),
  };
  process.stdout.write(RESULT_MARK + JSON.stringify(figures) + "\n");
}

// Only when this file itself is the child (the catalogue part imports runChild from the download part).
if (process.argv.includes("--child") && process.argv[1]?.endsWith("download.ts")) {
  child().then(
    () => process.exit(0),
    (e) => {
      process.stderr.write(`${e instanceof Error ? e.stack : e}\n`);
      process.exit(1);
    },
  );
}
