import type { ColumnMap } from "../../shared/schemas/column-map";
import type { QcSettings } from "../../shared/schemas/qc-settings";
import { ENGINE_SLICE, sliceChunk, type ParseWarning } from "../../shared/compute/canonical";
import { createEngine, type Engine, type EngineBlock, type RunSummary } from "../../shared/compute/engine";
import type { DeploymentContext, Provenance } from "../../shared/compute/diagnostics";
import { inferInterval } from "../../shared/compute/timing";
import { InputError, openCanonicalStream } from "./read-csv";

export interface ProcessResult {
  summary: RunSummary;
  provenance: Provenance;
  /** The first `keepWarnings` parse warnings, with line numbers. */
  warnings: ParseWarning[];
  warningCount: number;
  /** The sampling interval inferred from the first records when the settings gave none (s), else NaN. */
  inferredIntervalS: number;
  engine: Engine;
  platformIds: string[];
}

/**
 * Streams a file through a column map, QC and diagnostics: the whole ingest in one call, for the command line and
 * the server's worker. `onBlock` receives finished records in file order (with the platform-id table); a block's arrays are valid only until
 * `onBlock` resolves (the engine reuses them), so write or copy them before returning. Settings are not changed;
 * an inferred interval is applied to a copy. Throws InputError (one readable line) for unusable input.
 */
export async function processFile(
  path: string,
  map: ColumnMap,
  settings: QcSettings,
  ctx: DeploymentContext,
  onBlock: (block: EngineBlock, engine: Engine, platformIds: string[]) => void | Promise<void>,
  keepWarnings = 20,
): Promise<ProcessResult> {
  const { canonicalizer, chunks } = await openCanonicalStream(path, map);
  const run = structuredClone(settings);
  let engine: Engine | null = null;
  const warnings: ParseWarning[] = [];
  let warningCount = 0;
  let inferred = NaN;
  for await (const { chunk, warnings: w } of chunks) {
    warningCount += w.length;
    for (const x of w) if (warnings.length < keepWarnings) warnings.push(x);
    if (!engine) {
      if (run.timing.expectedIntervalS === null) {
        inferred = inferInterval(chunk.time, chunk.platform);
        if (Number.isFinite(inferred)) run.timing.expectedIntervalS = inferred;
      }
      engine = createEngine(run, ctx, canonicalizer.variables, { reuseBlocks: true });
    }
    for (let s = 0; s < chunk.n; s += ENGINE_SLICE) {
      const b = engine.push(sliceChunk(chunk, s, Math.min(chunk.n, s + ENGINE_SLICE)));
      if (b.n > 0) await onBlock(b, engine, canonicalizer.platformIds);
    }
  }
  if (!engine) throw new InputError(`${path}: no data rows after the header`);
  const last = engine.finish();
  if (last.n > 0) await onBlock(last, engine, canonicalizer.platformIds);
  const summary = engine.summary();
  if (summary.rows > 0 && summary.timeMin === Infinity) {
    throw new InputError(`${path}: no record has a readable time (first problem: line ${warnings[0]?.line ?? "?"}: ${warnings[0]?.message ?? "?"})`);
  }
  return { summary, provenance: engine.provenance, warnings, warningCount, inferredIntervalS: inferred, engine, platformIds: canonicalizer.platformIds };
}
