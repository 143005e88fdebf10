import { once } from "node:events";
import { statSync } from "node:fs";
import type pg from "pg";
import { from as copyFrom, to as copyTo } from "pg-copy-streams";
import { columnMapSchema } from "@shared/schemas/column-map";
import { resolveQcSettings, type QcSettings } from "@shared/schemas/qc-settings";
import type { BuildError, BuildMode, QcRunReport } from "@shared/schemas/versions";
import { derivedVocabulary, vocabulary, type DerivedVariable, type MeasuredVariable } from "@shared/vocabulary";
import type { RecordChunk } from "@shared/compute/canonical";
import type { DeploymentContext } from "@shared/compute/diagnostics";
import { createEngine, flatLineCounts, type EngineBlock, type RunSummary } from "@shared/compute/engine";
import { inferInterval } from "@shared/compute/timing";
import { pool } from "../db/client";
import { FLAG_ORDER, flagSql } from "../db/record-flags";
import { pathForKey } from "../lib/file-store";
import { applyManualFlags } from "../services/annotations";
import { attachRecordPartition, createRecordPartition } from "../db/record-partitions";
import { copyHeader, copyTrailer, createRecordEncoder } from "./copy-encoder";
import { writePlotSeries } from "./plot-series";
import { InputError, openCanonicalStream } from "./read-csv";
import { openThreadedCanonicalStream } from "./threaded-stream";
import { createSummariser, type Summariser } from "./summarise";

/**
 * Builds one version: upload → column map → canonical units → QC + diagnostics engine → binary COPY into records,
 * then summaries and plot buckets, all in ONE transaction on one connection. Nothing is visible until it commits,
 * a killed worker or a lost connection leaves nothing behind, and a retry starts from a clean slate. Reading,
 * parsing and computing in this process overlap with PostgreSQL ingesting the COPY stream in its own process.
 */

export class BuildCancelled extends Error {}

export type BuildOutcome = "built" | "skipped" | "failed" | "cancelled";

export interface BuildOptions {
  jobId?: string;
  /**
   * Bytes per file read (default 256 KiB): small pieces keep the COPY socket fed between computing steps. On the
   * bench month, 1 MiB pieces left the worker waiting ~4 s for PostgreSQL and PostgreSQL idle between bursts;
   * 256 KiB (or 64 KiB) brought that wait under 1 s and the build from ~14–16 s to ~11–12 s; 512 KiB was between.
   */
  chunkBytes?: number;
  /** How often progress is written and cancellation checked, ms. */
  progressEveryMs?: number;
}

const unitOf = (v: string) => (v in vocabulary ? vocabulary[v as MeasuredVariable].canonicalUnit : (derivedVocabulary[v as DerivedVariable]?.unit ?? ""));

function deepMerge(base: unknown, over: unknown): unknown {
  if (over === undefined) return base;
  if (over === null || typeof over !== "object" || Array.isArray(over) || base === null || typeof base !== "object" || Array.isArray(base)) return over;
  const out: Record<string, unknown> = { ...(base as Record<string, unknown>) };
  for (const [k, v] of Object.entries(over as Record<string, unknown>)) out[k] = deepMerge(out[k], v);
  return out;
}

/** Trailing time the window tests need before the first new record, s (so they see across the seam). */
function seamWindowS(s: QcSettings): number {
  const dt = s.timing.expectedIntervalS ?? 60;
  let w = 10 * dt;
  for (const q of Object.values(s.variables)) {
    if (q?.rateOfChange) w = Math.max(w, q.rateOfChange.windowS + 2 * dt);
    if (q?.attenuatedSignal) w = Math.max(w, q.attenuatedSignal.windowS + 2 * dt);
    if (q?.flatLine) {
      const k = flatLineCounts(q.flatLine, s.timing.expectedIntervalS);
      w = Math.max(w, (Math.max(k.fail, k.suspect) + 2) * dt);
    }
  }
  return w;
}

interface Loaded {
  versionId: string;
  datasetId: string;
  number: number;
  createdBy: string | null;
  mode: BuildMode;
  columnMap: unknown;
  overrides: unknown;
  deploymentOverrides: unknown;
  storageKey: string;
  uploadName: string;
  ctx: DeploymentContext;
  /** The deployment's watch-circle radius, m (the location test's default for a mooring). */
  watchCircleM: number | undefined;
  cancelRequested: boolean;
  attempt: number;
}

async function load(client: pg.PoolClient, versionId: string): Promise<Loaded | null> {
  const { rows } = await client.query(
    `select v.id, v.dataset_id, v.number, v.state, v.created_by, r.mode, r.column_map, r.settings_overrides, r.cancel_requested, r.attempt,
            u.storage_key, u.original_name, q.settings as deployment_settings,
            dp.latitude, dp.longitude, dp.anemometer_height_m, dp.current_meter_depth_m, dp.coastline_offshore_bearing_deg, dp.watch_circle_radius_m, p.kind
       from versions v
       join qc_runs r on r.version_id = v.id
       join uploads u on u.id = v.upload_id
       join datasets d on d.id = v.dataset_id
       left join deployments dp on dp.id = d.deployment_id
       left join platforms p on p.id = dp.platform_id
       left join deployment_qc_settings q on q.deployment_id = dp.id
      where v.id = $1
      for update of v`,
    [versionId],
  );
  const r = rows[0];
  if (!r || r.state !== "processing") return null;
  const num = (x: unknown) => (x === null || x === undefined ? undefined : Number(x));
  return {
    versionId,
    datasetId: r.dataset_id,
    number: r.number,
    createdBy: r.created_by,
    mode: r.mode,
    columnMap: r.column_map,
    overrides: r.settings_overrides ?? {},
    deploymentOverrides: r.deployment_settings ?? {},
    storageKey: r.storage_key,
    uploadName: r.original_name,
    cancelRequested: r.cancel_requested,
    attempt: r.attempt,
    watchCircleM: num(r.watch_circle_radius_m),
    ctx: {
      platformKind: r.kind ?? "drifter",
      latitude: num(r.latitude),
      longitude: num(r.longitude),
      windHeightM: num(r.anemometer_height_m),
      currentDepthM: num(r.current_meter_depth_m),
      coastlineDeg: num(r.coastline_offshore_bearing_deg),
    },
  };
}

const issueText = (issues: { path: PropertyKey[]; message: string }[]) => {
  const i = issues[0]!;
  return `${i.path.length ? `${i.path.map(String).join(".")}: ` : ""}${i.message}`;
};

/** Copies an engine summary so later pushes do not change it. */
const snapshot = (s: RunSummary): RunSummary => structuredClone(s);

function subtractCounts(after: RunSummary, before: RunSummary | null): Pick<QcRunReport, "testCounts" | "flagCounts"> {
  const flagCounts: Record<string, number[]> = {};
  for (const [k, c] of Object.entries(after.flagCounts)) {
    const b = before?.flagCounts[k as MeasuredVariable];
    flagCounts[k] = c!.map((x, i) => x - (b?.[i] ?? 0));
  }
  const testCounts: Record<string, Record<string, [number, number]>> = {};
  for (const [k, tests] of Object.entries(after.testCounts)) {
    const out: Record<string, [number, number]> = {};
    for (const [t, [s, f]] of Object.entries(tests!)) {
      const b = before?.testCounts[k as MeasuredVariable]?.[t];
      const e: [number, number] = [s - (b?.[0] ?? 0), f - (b?.[1] ?? 0)];
      if (e[0] || e[1]) out[t] = e;
    }
    if (Object.keys(out).length) testCounts[k] = out;
  }
  return { testCounts, flagCounts };
}

/**
 * Runs the build of `versionId` if it is still processing. Data problems (bad map, unreadable file, no usable rows)
 * fail the version with a message naming line and column; a cancel request rolls back and marks it cancelled;
 * anything else (e.g. a lost database connection) rolls back and is thrown, for the queue to retry.
 */
export async function buildVersion(versionId: string, opts: BuildOptions = {}): Promise<BuildOutcome> {
  const client = await pool.connect();
  let clientBroken: Error | undefined;
  // Settles (rejects) once the build's connection is lost, so no wait on the COPY stream can outlive it.
  let signalBroken: (e: Error) => void = () => undefined;
  const broken = new Promise<never>((_, reject) => (signalBroken = reject));
  broken.catch(() => undefined);
  const onClientError = (e: Error) => {
    clientBroken = e;
    signalBroken(e);
  };
  const onClientEnd = () => onClientError(clientBroken ?? new Error("the database connection of the build ended"));
  client.on("error", onClientError);
  client.on("end", onClientEnd);
  let ticker: NodeJS.Timeout | undefined;
  let tick: Promise<void> = Promise.resolve();
  const t0 = performance.now();
  const timings: Record<string, number> = {};
  let stage = "reading";
  let bytesDone = 0;
  let rowsDone = 0;
  let cancelled = false;
  let loaded: Loaded | null = null;
  // An open COPY must be aborted (CopyFail) before the connection can run anything else, even a rollback.
  let abortCopy: (() => Promise<void>) | null = null;
  let closeStream: (() => void) | null = null;
  try {
    await client.query("begin");
    await client.query("set local application_name = 'tauline-build'");
    loaded = await load(client, versionId);
    if (!loaded) {
      await client.query("rollback");
      return "skipped";
    }
    const L = loaded;
    if (L.cancelRequested) throw new BuildCancelled();
    const filePath = pathForKey(L.storageKey);
    let bytesTotal = 0;
    try {
      bytesTotal = statSync(filePath).size;
    } catch {
      throw new InputError(`The uploaded file ${L.uploadName} is missing from storage; upload it again`);
    }
    await pool.query(
      `update qc_runs set state = 'running', stage = 'reading', attempt = attempt + 1, job_id = coalesce($2, job_id), bytes_total = $3,
              bytes_done = 0, rows_done = 0, rows_per_s = null, error = null, started_at = now(), heartbeat_at = now(), finished_at = null
        where version_id = $1`,
      [versionId, opts.jobId ?? null, bytesTotal],
    );
    const writeProgress = async () => {
      const secs = (performance.now() - t0) / 1000;
      const r = await pool.query(
        `update qc_runs set stage = $2, bytes_done = $3, rows_done = $4, rows_per_s = $5, heartbeat_at = now() where version_id = $1 returning cancel_requested`,
        [versionId, stage, bytesDone, rowsDone, secs > 0 ? rowsDone / secs : null],
      );
      if (r.rows[0]?.cancel_requested) cancelled = true;
    };
    ticker = setInterval(() => {
      tick = tick.then(writeProgress).catch(() => undefined);
    }, opts.progressEveryMs ?? 500);

    // Settings: defaults ← deployment's ← this build's overrides.
    const map = columnMapSchema.safeParse(L.columnMap);
    if (!map.success) throw new InputError(`The column map is not valid: ${issueText(map.error.issues)}`);
    const resolved = resolveQcSettings(deepMerge(L.deploymentOverrides, L.overrides) as never);
    if (!resolved.success) throw new InputError(`The QC settings are not valid: ${issueText(resolved.error.issues)}`);
    const settings = resolved.data;
    // A mooring's watch circle is recorded on its deployment; unless the settings give a radius of their own, the
    // location test uses that one (and the settings snapshot records it).
    if (settings.location.watchCircleM === null && L.ctx.platformKind === "mooring" && L.watchCircleM !== undefined && L.watchCircleM > 0)
      settings.location.watchCircleM = L.watchCircleM;

    // BUILD_PARSE_THREAD=1 parses on a worker thread beside the engine and the COPY: a gain with cores to spare; on
    // two cores it competes with PostgreSQL's COPY and measured no better (commit body), so it is off by default.
    const open = process.env.BUILD_PARSE_THREAD === "1" ? openThreadedCanonicalStream : openCanonicalStream;
    const stream = await open(filePath, map.data, {
      label: L.uploadName,
      chunkBytes: opts.chunkBytes ?? 256 << 10,
      onBytes: (b) => (bytesDone = b),
    });
    const { canonicalizer, chunks } = stream;
    closeStream = () => stream.close();
    const first = await chunks.next();
    if (first.done) throw new InputError(`${L.uploadName} has no data rows after the header`, map.data.headerRow + map.data.skipRows + 1);
    if (settings.timing.expectedIntervalS === null) {
      const dt = inferInterval(first.value.chunk.time, first.value.chunk.platform);
      if (Number.isFinite(dt) && dt > 0) settings.timing.expectedIntervalS = dt;
    }
    const fleet = map.data.platformColumn !== undefined;
    const keys: string[] = fleet ? [] : [""];
    const keyIndex = new Map<string, number>(fleet ? [] : [["", 0]]);
    const keyOf = (id: string) => {
      let k = keyIndex.get(id);
      if (k === undefined) {
        k = keys.length;
        keys.push(id);
        keyIndex.set(id, k);
      }
      return k;
    };
    // The engine's platform indexes are ours (shared with context rows), not the canonicalizer's.
    const remap = (c: RecordChunk): RecordChunk => {
      if (!c.platform) return c;
      const ids = canonicalizer.platformIds;
      const p = new Int32Array(c.n);
      for (let i = 0; i < c.n; i++) p[i] = keyOf(ids[c.platform[i]!]!);
      return { ...c, platform: p };
    };

    const inputVars = canonicalizer.variables;
    // Blocks are encoded and summarised before the next push and never kept, so the engine may reuse its output
    // arrays: ~3 MB of fresh typed arrays per megabyte of file otherwise, and the collector's time with them.
    const engine = createEngine(settings, L.ctx, inputVars, { reuseBlocks: true });
    // A variable the engine knows but the records table does not yet have (vocabulary ahead of migrations) is left
    // out with a warning rather than failing the build.
    const stored = await recordColumns(client);
    const engineColumns = [...engine.variables, ...engine.derivedVariables] as string[];
    const columns = engineColumns.filter((c) => stored.has(c) && FLAG_ORDER.includes(c));
    const unstored = engineColumns.filter((c) => !columns.includes(c));
    const encoder = createRecordEncoder(L.datasetId, L.number, columns, keys);
    const summariser: Summariser | null =
      L.mode === "replace" ? createSummariser(columns, columns.map(unitOf), settings.timing.expectedIntervalS, settings.timing.gapFactor) : null;

    // Context: the base version's records just before the new data, so window tests see across the seam.
    let contextCount = 0;
    const tailIndex = new Map<number, number>(); // platform → index of its last context record
    const tailTime = new Map<number, string>(); // platform → that record's time as PostgreSQL text
    const lastWritten = new Map<number, number>();
    if (L.mode === "append") {
      let a0 = Infinity;
      for (const t of first.value.chunk.time) if (t < a0) a0 = t;
      if (Number.isFinite(a0)) {
        const cols = inputVars.map((v) => `"${v}"`).join(", ");
        const ctxRows = await client.query({
          text: `select extract(epoch from time)::float8 as t, time::text as tt, platform${cols ? `, ${cols}` : ""} from records
                  where dataset_id = $1 and valid_to is null and time >= to_timestamp($2) and time < to_timestamp($3)
                  order by time, platform`,
          values: [L.datasetId, a0 - seamWindowS(settings), a0],
          rowMode: "array",
        });
        const n = ctxRows.rows.length;
        if (n) {
          const c: RecordChunk = {
            n,
            time: new Float64Array(n),
            platform: fleet ? new Int32Array(n) : null,
            line: new Float64Array(n),
            values: Object.fromEntries(inputVars.map((v) => [v, new Float64Array(n)])),
            bad: {},
            recordBad: new Uint8Array(n),
          };
          ctxRows.rows.forEach((row: unknown[], i) => {
            c.time[i] = row[0] as number;
            const p = fleet ? keyOf(row[2] as string) : 0;
            if (c.platform) c.platform[i] = p;
            inputVars.forEach((v, k) => (c.values[v]![i] = row[3 + k] === null ? NaN : (row[3 + k] as number)));
            tailIndex.set(p, i);
            tailTime.set(p, row[1] as string);
            lastWritten.set(p, row[0] as number);
          });
          contextCount = n;
          engine.push(c); // context records are re-emitted below; only each platform's tail is written again
        }
      }
    }
    const before = contextCount ? snapshot(engine.summary()) : null;
    const tails = new Set(tailIndex.values());

    // This version's rows go into a partition of their own, created here and attached once written
    // (drizzle/0016_records_partition_per_build.sql). FREEZE: the table is this transaction's, and no reader can ask
    // for version N's rows before this transaction marks it ready, so writing them already frozen is safe.
    const part = await createRecordPartition(client, L.datasetId, L.number);
    const copy = client.query(copyFrom(`copy ${part} (${encoder.columnList}) from stdin with (format binary, freeze)`));
    const copyDone = new Promise<void>((resolve, reject) => {
      copy.on("finish", resolve);
      copy.on("error", reject);
    });
    copyDone.catch(() => undefined);
    abortCopy = async () => {
      copy.destroy(new BuildCancelled("build stopped"));
      await copyDone.catch(() => undefined);
    };
    let waitCopyMs = 0;
    const write = async (buf: Buffer) => {
      if (!copy.write(buf) && copy.writableLength > 32 << 20) {
        const w = performance.now();
        await Promise.race([once(copy, "drain"), copyDone, broken]);
        waitCopyMs += performance.now() - w;
      }
    };
    copy.write(copyHeader());

    let rowsRead = 0;
    let dropped = 0;
    // Per platform, the first time this build writes (its last is lastWritten): the span an append replaces.
    const lo = new Map<number, number>();
    let take = new Int32Array(0);
    const emit = async (b: EngineBlock) => {
      if (b.n === 0) return;
      if (take.length < b.n) take = new Int32Array(Math.max(b.n, take.length * 2));
      let m = 0;
      // Per-platform state lives in locals over each run of one platform's rows (a mooring's block is one run),
      // and goes back to the maps when the platform changes: three map operations per record cost ~0.3 s a month.
      let runP = -1;
      let last: number | undefined;
      let first = false;
      for (let i = 0; i < b.n; i++) {
        const g = b.start + i;
        if (g < contextCount) {
          if (tails.has(g)) take[m++] = i;
          continue;
        }
        const t = b.time[i]!;
        const p = b.platform ? b.platform[i]! : 0;
        if (p !== runP) {
          if (runP >= 0 && last !== undefined) lastWritten.set(runP, last);
          runP = p;
          last = lastWritten.get(p);
          first = !lo.has(p);
        }
        if (!Number.isFinite(t) || (last !== undefined && t <= last)) {
          dropped++;
          continue;
        }
        last = t;
        if (first) {
          lo.set(p, t);
          first = false;
        }
        take[m++] = i;
      }
      if (runP >= 0 && last !== undefined) lastWritten.set(runP, last);
      if (m === 0) return;
      const values = columns.map((v) => (b.values[v as MeasuredVariable] ?? b.derived[v as DerivedVariable])!);
      const flags = columns.map((v) => (b.flags[v as MeasuredVariable] ?? b.derivedFlags[v as DerivedVariable])!);
      const platform = fleet ? b.platform : null;
      await write(encoder.encode({ n: b.n, time: b.time, platform, values, flags, take, takeCount: m }));
      rowsDone += m;
      if (summariser) {
        // Feed runs of one platform (the summariser keeps per-platform state).
        let s = 0;
        for (let k = 1; k <= m; k++) {
          const pk = platform ? platform[take[k - 1]!]! : 0;
          if (k === m || (platform ? platform[take[k]!]! : 0) !== pk) {
            summariser.add(keys[pk]!, b.time, values, flags, take, s, k);
            s = k;
          }
        }
      }
    };

    const warnings: QcRunReport["warnings"] = unstored.length ? [{ line: 0, message: `not stored (no records column yet): ${unstored.join(", ")}` }] : [];
    let warningCount = warnings.length;
    const note = (w: { line: number; column?: string; message: string }[]) => {
      warningCount += w.length;
      for (const x of w) if (warnings.length < 50) warnings.push(x);
    };
    const tRead = performance.now();
    let next: IteratorResult<{ chunk: RecordChunk; warnings: { line: number; column?: string; message: string }[] }> = first;
    // Where the time goes (in the timings): parsing, the engine plus encoding, and waiting for PostgreSQL.
    let parseMs = 0;
    let computeMs = 0;
    while (!next.done) {
      if (cancelled) throw new BuildCancelled();
      if (clientBroken) throw clientBroken;
      note(next.value.warnings);
      rowsRead += next.value.chunk.n;
      const c = performance.now();
      const block = engine.push(remap(next.value.chunk));
      const w0 = waitCopyMs;
      await emit(block);
      computeMs += performance.now() - c - (waitCopyMs - w0);
      const r = performance.now();
      next = await chunks.next();
      parseMs += performance.now() - r;
    }
    await emit(engine.finish());
    copy.end(copyTrailer());
    await Promise.race([copyDone, broken]);
    abortCopy = null;
    timings.read_compute_copy_s = (performance.now() - tRead) / 1000;
    timings.parse_s = parseMs / 1000;
    timings.compute_encode_s = computeMs / 1000;
    timings.wait_copy_s = waitCopyMs / 1000;
    if (cancelled) throw new BuildCancelled();
    await attachRecordPartition(client, L.datasetId, L.number);

    const rowsWritten = rowsDone - tails.size;
    if (rowsWritten === 0) {
      const w = warnings[0];
      throw new InputError(
        w ? `No record of ${L.uploadName} has a usable time; first problem at line ${w.line}${w.column ? `, column ${w.column}` : ""}: ${w.message}` : `${L.uploadName} has no usable records`,
        w?.line,
        w?.column,
      );
    }

    // Close what the new rows replace. Rows stay in earlier versions (their range ends at this version).
    stage = "summarising";
    const tClose = performance.now();
    let replaced = 0;
    if (L.mode === "replace") {
      const r = await client.query(`update records set valid_to = $2 where dataset_id = $1 and valid_to is null and valid_from < $2`, [L.datasetId, L.number]);
      replaced = r.rowCount ?? 0;
    } else {
      for (const [p, from] of lo) {
        const r = await client.query(
          `update records set valid_to = $2 where dataset_id = $1 and platform = $3 and valid_to is null and valid_from < $2
              and time >= to_timestamp($4) and time <= to_timestamp($5)`,
          [L.datasetId, L.number, keys[p], from, lastWritten.get(p)],
        );
        replaced += r.rowCount ?? 0;
      }
      for (const [p, tt] of tailTime) {
        await client.query(`update records set valid_to = $2 where dataset_id = $1 and platform = $3 and valid_to is null and valid_from < $2 and time = $4::timestamptz`, [
          L.datasetId,
          L.number,
          keys[p],
          tt,
        ]);
      }
    }
    timings.close_s = (performance.now() - tClose) / 1000;

    const tSum = performance.now();
    // Manual flags from the dataset's annotations win over automatic ones and carry over to every build.
    const manual = await applyManualFlags(client, L.datasetId, L.number, { settings, ctx: L.ctx, fresh: true });
    timings.manual_flags_s = (performance.now() - tSum) / 1000;
    const sum = summariser && manual.rowsChanged === 0 ? summariser : await summariseVersion(client, L.datasetId, L.number, columns, settings);
    const summary = sum.summary();
    await writePlotSeries(client, versionId, sum.plotSeries());
    timings.summaries_s = (performance.now() - tSum) / 1000;
    timings.total_s = (performance.now() - t0) / 1000;

    const counts = subtractCounts(engine.summary(), before);
    const report: QcRunReport = {
      mode: L.mode,
      attempt: L.attempt + 1,
      settings,
      provenance: engine.provenance,
      rowsRead,
      rowsWritten,
      rowsReplaced: replaced,
      rowsDropped: dropped,
      ...counts,
      warnings,
      warningCount,
      timings,
    };
    clearInterval(ticker);
    ticker = undefined;
    await tick;
    // A cancel that arrived after the last progress tick still stops the build: nothing is visible before commit.
    if (cancelled || (await client.query(`select cancel_requested from qc_runs where version_id = $1`, [versionId])).rows[0]?.cancel_requested)
      throw new BuildCancelled();
    await client.query(`update versions set state = 'ready', summary = $2, state_changed_at = clock_timestamp() where id = $1`, [versionId, summary]);
    await client.query(
      `update qc_runs set state = 'succeeded', stage = 'done', settings = $2, provenance = $3, counts = $4, warnings = $5, timings = $6,
              rows_done = $7, bytes_done = bytes_total, rows_per_s = $8, finished_at = clock_timestamp(), heartbeat_at = clock_timestamp() where version_id = $1`,
      [versionId, settings, engine.provenance, report, warnings, timings, rowsWritten, rowsWritten / timings.total_s],
    );
    await client.query(
      `insert into audit_log (actor_id, action, entity_type, entity_id, from_state, to_state, details) values (null, 'version.built', 'version', $1, 'processing', 'ready', $2)`,
      [versionId, { rowsWritten, rowsReplaced: replaced, rowsDropped: dropped, attempt: L.attempt + 1 }],
    );
    await client.query("commit");
    return "built";
  } catch (e) {
    if (ticker) clearInterval(ticker);
    await tick;
    if (abortCopy && !clientBroken) await abortCopy();
    if (!clientBroken) await client.query("rollback").catch(() => undefined);
    if (e instanceof BuildCancelled) {
      await finishUnbuilt(versionId, "cancelled", { message: "Processing was cancelled; retry to run it again" });
      return "cancelled";
    }
    if (e instanceof InputError) {
      await finishUnbuilt(versionId, "failed", { message: e.message, line: e.line, column: e.column });
      return "failed";
    }
    throw e;
  } finally {
    closeStream?.();
    client.off("error", onClientError);
    client.off("end", onClientEnd);
    client.release(clientBroken ?? undefined);
  }
}

let recordColumnSet: Set<string> | undefined;
async function recordColumns(client: pg.PoolClient): Promise<Set<string>> {
  if (!recordColumnSet) {
    const r = await client.query<{ column_name: string }>(`select column_name from information_schema.columns where table_schema = current_schema() and table_name = 'records'`);
    recordColumnSet = new Set(r.rows.map((x) => x.column_name));
  }
  return recordColumnSet;
}

/** Marks a version that will not be built: failed (with the reason) or cancelled. */
export async function finishUnbuilt(versionId: string, runState: "failed" | "cancelled", error: BuildError) {
  const c = await pool.connect();
  try {
    await c.query("begin");
    const r = await c.query(`update versions set state = 'failed', state_changed_at = now() where id = $1 and state = 'processing' returning id`, [versionId]);
    await c.query(`update qc_runs set state = $2, error = $3, finished_at = now(), heartbeat_at = now() where version_id = $1`, [versionId, runState, error]);
    if (r.rowCount)
      await c.query(
        `insert into audit_log (actor_id, action, entity_type, entity_id, from_state, to_state, reason) values (null, $2, 'version', $1, 'processing', 'failed', $3)`,
        [versionId, runState === "cancelled" ? "version.cancelled" : "version.failed", error.message],
      );
    await c.query("commit");
  } catch (e) {
    await c.query("rollback").catch(() => undefined);
    throw e;
  } finally {
    c.release();
  }
}

/**
 * Reads a version's rows back in time order (binary-free text COPY) and summarises them: used after an append,
 * where the version is the base's rows plus the new ones, and by the rebuild-summaries job. O(version rows).
 */
export async function summariseVersion(client: pg.PoolClient, datasetId: string, number: number, columns: string[], settings: QcSettings): Promise<Summariser> {
  const s = createSummariser(columns, columns.map(unitOf), settings.timing.expectedIntervalS, settings.timing.gapFactor);
  const cols = columns.flatMap((c) => [`"${c}"`, flagSql(c)]).join(", ");
  const out = client.query(
    copyTo(
      `copy (select platform, extract(epoch from time)::float8, ${cols} from records
              where dataset_id = '${datasetId.replace(/[^0-9a-f-]/gi, "")}' and valid_from <= ${number | 0} and (valid_to is null or valid_to > ${number | 0})
              order by platform, time) to stdout`,
    ),
  );
  const nv = columns.length;
  const CAP = 8192;
  const time = new Float64Array(CAP);
  const values = columns.map(() => new Float64Array(CAP));
  const flags = columns.map(() => new Uint8Array(CAP));
  const idx = new Int32Array(CAP).map((_, i) => i);
  let n = 0;
  let platform = "";
  const flush = () => {
    if (n) s.add(platform, time, values, flags, idx, 0, n);
    n = 0;
  };
  let carry = "";
  const decoder = new TextDecoder();
  for await (const chunk of out as AsyncIterable<Buffer>) {
    carry += decoder.decode(chunk, { stream: true });
    let start = 0;
    for (;;) {
      const end = carry.indexOf("\n", start);
      if (end < 0) break;
      const f = carry.slice(start, end).split("\t");
      start = end + 1;
      const p = f[0] === "\\N" ? "" : f[0]!;
      if (p !== platform || n === CAP) {
        flush();
        platform = p;
      }
      time[n] = Number(f[1]);
      for (let v = 0; v < nv; v++) {
        const x = f[2 + 2 * v]!;
        values[v]![n] = x === "\\N" ? NaN : Number(x);
        const q = f[3 + 2 * v]!;
        flags[v]![n] = q === "\\N" ? 9 : Number(q);
      }
      n++;
    }
    carry = carry.slice(start);
  }
  flush();
  return s;
}
