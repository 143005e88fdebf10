/**
 * Bench part "engine": papaparse parsing the month-at-1-Hz mooring CSV against Tauline's QC + diagnostics on the
 * parsed columns, in the same run and the same chunks. Converting text fields to canonical numbers is timed apart
 * (it belongs to neither side). ratio = engine rows/s ÷ parse rows/s; the goal is ratio > 1.
 */
import { createReadStream } from "node:fs";
import { performance } from "node:perf_hooks";
import { columnMapSchema } from "../../shared/schemas/column-map";
import { resolveQcSettings } from "../../shared/schemas/qc-settings";
import { createCanonicalizer, ENGINE_SLICE, sliceChunk } from "../../shared/compute/canonical";
import { createEngine } from "../../shared/compute/engine";
import { demoMooringColumnMap } from "../../shared/demo/generate";
import { parseDelimited } from "../../server/pipeline/read-csv";
import type { BenchContext } from "./run";

export async function run(ctx: BenchContext) {
  const path = await ctx.mooringCsv();
  const map = columnMapSchema.parse(demoMooringColumnMap());
  const canon = createCanonicalizer(map);
  const settings = resolveQcSettings({ timing: { expectedIntervalS: ctx.mooringOptions.intervalS } });
  if (!settings.success) throw settings.error;
  const engine = createEngine(
    settings.data,
    { platformKind: "mooring", latitude: ctx.mooringOptions.latitude, longitude: ctx.mooringOptions.longitude, windHeightM: 4, coastlineDeg: 270 },
    canon.variables,
    { reuseBlocks: true },
  );
  let parseMs = 0;
  let convertMs = 0;
  let engineMs = 0;
  let rows = 0;
  let emitted = 0;
  let line = 1;
  let carry = "";
  let header = true;
  const step = (text: string) => {
    let t0 = performance.now();
    const data = parseDelimited(text, ",");
    parseMs += performance.now() - t0;
    if (data.length && data[data.length - 1]!.length === 1 && data[data.length - 1]![0] === "") data.pop();
    let body = data;
    if (header) {
      canon.bindHeader(data[0]!, 1);
      body = data.slice(1);
      line = 2;
      header = false;
    }
    t0 = performance.now();
    const { chunk } = canon.convert(body, line);
    convertMs += performance.now() - t0;
    line += body.length;
    rows += chunk.n;
    t0 = performance.now();
    for (let s = 0; s < chunk.n; s += ENGINE_SLICE) emitted += engine.push(sliceChunk(chunk, s, Math.min(chunk.n, s + ENGINE_SLICE))).n;
    engineMs += performance.now() - t0;
  };
  for await (const piece of createReadStream(path, { encoding: "utf8", highWaterMark: 8 << 20 })) {
    carry += piece as string;
    const cut = carry.lastIndexOf("\n");
    if (cut < 0) continue;
    step(carry.slice(0, cut + 1));
    carry = carry.slice(cut + 1);
  }
  if (carry) step(carry);
  const t0 = performance.now();
  emitted += engine.finish().n;
  engineMs += performance.now() - t0;
  if (emitted !== rows) throw new Error(`engine emitted ${emitted} of ${rows} rows`);
  const parse = rows / (parseMs / 1000);
  const eng = rows / (engineMs / 1000);
  ctx.log(`engine: ${rows} rows; parse ${(parseMs / 1000).toFixed(2)} s, to canonical ${(convertMs / 1000).toFixed(2)} s, QC+diagnostics ${(engineMs / 1000).toFixed(2)} s`);
  return {
    rows,
    parse_rows_per_s: Math.round(parse),
    engine_rows_per_s: Math.round(eng),
    ratio: Number((eng / parse).toFixed(3)),
  };
}
