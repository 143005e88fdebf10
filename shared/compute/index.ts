/**
 * Tauline's science engine: QC and air–sea diagnostics, pure and column-wise (no I/O; runs in Node and the
 * browser). The ingest path, as the command line and the worker run it:
 *
 *   const map = columnMapSchema.parse(json);                       // shared/schemas/column-map.ts
 *   const settings = resolveQcSettings(overrides).data;            // shared/schemas/qc-settings.ts
 *   const canon = createCanonicalizer(map);                        // text rows → canonical columns
 *   canon.bindHeader(headerRow, 1);
 *   const engine = createEngine(settings, ctx, canon.variables, { reuseBlocks: true });
 *   for each parsed piece: const { chunk, warnings } = canon.convert(rows, firstLine);
 *     for each slice of ENGINE_SLICE records: write(engine.push(sliceChunk(chunk, s, e)));
 *   write(engine.finish()); report(engine.summary(), engine.provenance);
 *
 * cli/lib/process-file.ts wraps exactly this around a file stream (`processFile`).
 */
export * from "./flags";
export * from "./directions";
export * from "./physics";
export * from "./geodesy";
export * from "./canonical";
export * from "./diagnostics";
export * from "./engine";
export * from "./array";
export * from "./timing";
