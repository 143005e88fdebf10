import { createWriteStream, readFileSync } from "node:fs";
import { once } from "node:events";
import { columnMapSchema, type ColumnMap } from "../shared/schemas/column-map";
import { resolveQcSettings, type QcSettingsInput } from "../shared/schemas/qc-settings";
import type { Engine } from "../shared/compute/engine";
import { CAUTION, type DeploymentContext } from "../shared/compute/diagnostics";
import { dragLaws, type DragLaw } from "../shared/compute/physics";
import { testLabels, TEST } from "../shared/compute/flags";
import { InputError } from "./lib/read-csv";
import { processFile } from "./lib/process-file";
import { blockToCsv, outputColumns } from "./lib/write-csv";

export interface CheckOptions {
  map: string;
  out?: string;
  settings?: string;
  lat?: number;
  lon?: number;
  windHeight?: number;
  currentDepth?: number;
  dragLaw?: string;
  coastlineDeg?: number;
  platformKind?: string;
  interval?: number;
  watchCircle?: number;
}

function readJson(path: string, what: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, "utf8");
  } catch (e) {
    throw new InputError(`cannot read the ${what} ${path}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
  }
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new InputError(`the ${what} ${path} is not valid JSON: ${(e as Error).message}`);
  }
}

function issueLine(what: string, issues: { path: PropertyKey[]; message: string }[]): string {
  const i = issues[0]!;
  const where = i.path.length ? ` at ${i.path.map(String).join(".")}` : "";
  return `${what}${where}: ${i.message}`;
}

const iso = (t: number) => (Number.isFinite(t) ? new Date(t * 1000).toISOString().replace(".000Z", "Z") : "—");

/** Runs `tauline check`: reads FILE through the map, runs QC and diagnostics, writes OUT and prints a summary. */
export async function runCheck(file: string, opts: CheckOptions, print: (line: string) => void): Promise<void> {
  const parsedMap = columnMapSchema.safeParse(readJson(opts.map, "column map"));
  if (!parsedMap.success) throw new InputError(issueLine(`column map ${opts.map}`, parsedMap.error.issues));
  const map: ColumnMap = parsedMap.data;

  const overrides = (opts.settings ? readJson(opts.settings, "QC settings file") : {}) as QcSettingsInput;
  if (opts.dragLaw !== undefined) {
    if (!(dragLaws as readonly string[]).includes(opts.dragLaw)) throw new InputError(`--drag-law ${opts.dragLaw} is not one of ${dragLaws.join(", ")}`);
    overrides.diagnostics = { ...(overrides.diagnostics ?? {}), dragLaw: opts.dragLaw as DragLaw };
  }
  if (opts.interval !== undefined) overrides.timing = { ...(overrides.timing ?? {}), expectedIntervalS: opts.interval };
  if (opts.watchCircle !== undefined) overrides.location = { ...(overrides.location ?? {}), watchCircleM: opts.watchCircle };
  const settingsResult = resolveQcSettings(overrides);
  if (!settingsResult.success) throw new InputError(issueLine("QC settings", settingsResult.error.issues));
  const settings = settingsResult.data;

  if (opts.platformKind !== undefined && opts.platformKind !== "mooring" && opts.platformKind !== "drifter") throw new InputError(`--platform-kind must be mooring or drifter, not ${opts.platformKind}`);
  const ctx: DeploymentContext = {
    platformKind: (opts.platformKind as "mooring" | "drifter" | undefined) ?? (map.platformColumn !== undefined ? "drifter" : "mooring"),
    latitude: opts.lat,
    longitude: opts.lon,
    windHeightM: opts.windHeight,
    currentDepthM: opts.currentDepth,
    coastlineDeg: opts.coastlineDeg,
  };
  for (const [name, v, lim] of [["--lat", opts.lat, 90], ["--lon", opts.lon, 180], ["--coastline-deg", opts.coastlineDeg, 360]] as const) {
    if (v !== undefined && (!Number.isFinite(v) || Math.abs(v) > lim)) throw new InputError(`${name} ${v} is out of range`);
  }
  if (opts.windHeight !== undefined && !(opts.windHeight > 0)) throw new InputError(`--wind-height must be a positive number of metres`);

  const hasLat = map.columns.some((c) => c.variable === "latitude");
  if (!hasLat && opts.lat === undefined) print("note: no latitude column and no --lat: Coriolis and Ekman diagnostics are skipped");

  const outStream = opts.out ? createWriteStream(opts.out) : null;
  const outError = new Promise<never>((_, reject) => outStream?.on("error", (e) => reject(new InputError(`cannot write ${opts.out}: ${(e as NodeJS.ErrnoException).code ?? e.message}`))));
  outError.catch(() => undefined);
  const write = async (text: string) => {
    if (!outStream || text === "") return;
    if (!outStream.write(text)) await Promise.race([once(outStream, "drain"), outError]);
  };
  let headerWritten = false;
  const multi = map.platformColumn !== undefined;
  const result = await processFile(file, map, settings, ctx, async (b, engine, platformIds) => {
    if (!headerWritten) {
      await write(outputColumns(engine.variables, engine.derivedVariables, multi).join(",") + "\n");
      headerWritten = true;
    }
    // blockToCsv copies the numbers into text before the engine may reuse the block's arrays.
    await write(blockToCsv(b, engine.variables, engine.derivedVariables, multi ? platformIds : null));
  });
  if (outStream) {
    outStream.end();
    await Promise.race([once(outStream, "finish"), outError]);
  }
  const { engine, warnings, warningCount } = result;
  const inferred = result.inferredIntervalS;
  const s = result.summary;
  print(`rows: ${s.rows}${s.platforms > 1 ? ` from ${s.platforms} platforms` : ""}`);
  print(`time span: ${iso(s.timeMin)} to ${iso(s.timeMax)}`);
  if (Number.isFinite(inferred)) print(`sampling interval: ${inferred} s (inferred from the first records; gaps longer than ${settings.timing.gapFactor}× are flagged)`);
  print(`flags per variable (pass / not evaluated / suspect / fail / missing), and tests that raised suspect or fail:`);
  const width = Math.max(...Object.keys(s.flagCounts).map((k) => k.length));
  for (const [name, c] of Object.entries(s.flagCounts)) {
    const tests = s.testCounts[name as keyof typeof s.testCounts];
    const raised = tests
      ? Object.entries(tests)
          .map(([t, [sus, fail]]) => `${testLabels[t as keyof typeof TEST]} ${sus}/${fail}`)
          .join(", ")
      : "";
    print(`  ${name.padEnd(width)}  ${c![1]} / ${c![2]} / ${c![3]} / ${c![4]} / ${c![9]}${raised ? `   [${raised}]` : ""}`);
  }
  for (const [why, count] of Object.entries(s.notes)) print(`note: ${why}: ${count} records`);
  if (warningCount) {
    print(`warnings: ${warningCount}${warningCount > warnings.length ? ` (first ${warnings.length} shown)` : ""}`);
    for (const w of warnings) print(`  line ${w.line}${w.column ? `, column ${w.column}` : ""}: ${w.message}`);
  } else print("warnings: none");
  const p = engine.provenance;
  const hasWind = engine.variables.includes("eastward_wind");
  if (hasWind) print(`methods: drag law ${p.dragLaw}; 10 m wind ${p.neutralWind.method} from ${p.neutralWind.windHeightM} m${p.neutralWind.windHeightAssumed ? " (assumed; give --wind-height)" : ""}; air density ${p.airDensity.method}${p.airDensity.value ? ` ${p.airDensity.value} kg m-3` : ""}; seawater density ${p.seawaterDensity.value} kg m-3 (fixed); equator mask |lat| < ${p.equatorCutoffDeg}°`);
  if (drifterVelocity(engine)) print(`methods: drifter velocity ${p.drifter.velocity}; implied-speed QC ${p.drifter.impliedSpeed}`);
  if (opts.out) print(`wrote ${opts.out}`);
  print(`caution: ${CAUTION}`);
}

function drifterVelocity(e: Engine): boolean {
  return e.derivedVariables.includes("platform_speed_wrt_ground");
}
