import { sql } from "drizzle-orm";
import { CAUTION } from "@shared/compute/diagnostics";
import type { ColumnMap } from "@shared/schemas/column-map";
import { resolveQcSettings } from "@shared/schemas/qc-settings";
import {
  builtVersionStates,
  createVersionInputSchema,
  frozenVersionStates,
  qcRunReportSchema,
  versionSummaryDataSchema,
  type ArrayDiagnostics,
  type BuildStage,
  type CreatedVersion,
  type VersionDetail,
  type VersionProgress,
} from "@shared/schemas/versions";
import type { VersionState } from "@shared/schemas/datasets";
import { db, pool } from "../db/client";
import { enqueueBuild } from "../jobs/build-version.job";
import { AppError, conflict, notFound, unauthenticated } from "../lib/errors";
import type { SessionUser } from "../middleware/require-session";
import { pathForKey } from "../lib/file-store";
import { finishUnbuilt } from "../pipeline/build";
import { InputError, openCanonicalStream } from "../pipeline/read-csv";
import { assertProjectAccess, getProjectRole } from "./access";
import { writeAudit } from "./audit";

/**
 * Version builds: create (and queue), read with progress, cancel and retry. Review transitions live in
 * services/curation.ts. Visitors see released versions only; members see all of their project's versions.
 */

const iso = (d: Date | string | null) => (d === null ? null : new Date(d).toISOString());

function deepMerge(base: unknown, over: unknown): unknown {
  if (over === undefined) return base;
  if (over === null || typeof over !== "object" || Array.isArray(over) || base === null || typeof base !== "object" || Array.isArray(base)) return over;
  const out: Record<string, unknown> = { ...(base as Record<string, unknown>) };
  for (const [k, v] of Object.entries(over as Record<string, unknown>)) out[k] = deepMerge(out[k], v);
  return out;
}

// POST /api/datasets/:id/versions
export async function createVersion(user: SessionUser, datasetId: string, body: unknown): Promise<CreatedVersion> {
  const input = createVersionInputSchema.parse(body);
  const ds = await pool.query(
    `select d.id, d.project_id, d.deployment_id, q.settings as dep_settings from datasets d left join deployment_qc_settings q on q.deployment_id = d.deployment_id where d.id = $1`,
    [datasetId],
  );
  const d = ds.rows[0];
  if (!d) {
    if (!user) throw unauthenticated();
    throw notFound("Dataset");
  }
  await assertProjectAccess(user, d.project_id, "contribute");
  const up = await pool.query<{ storage_key: string; original_name: string }>(`select storage_key, original_name from uploads where id = $1 and dataset_id = $2`, [input.uploadId, datasetId]);
  if (!up.rowCount) throw new AppError("not_found", "Upload not found in this dataset; upload the file to this dataset first", 404, { uploadId: ["No such upload in this dataset"] });
  await assertMapFitsHeader(up.rows[0]!.storage_key, up.rows[0]!.original_name, input.columnMap);
  if (input.qcSettings) {
    const r = resolveQcSettings(deepMerge(d.dep_settings ?? {}, input.qcSettings) as never);
    if (!r.success) {
      const fields: Record<string, string[]> = {};
      for (const i of r.error.issues) (fields[["qcSettings", ...i.path.map(String)].join(".")] ??= []).push(i.message);
      throw new AppError("validation_failed", "The QC settings are not valid", 400, fields);
    }
  }

  const created = await db.transaction(async (tx) => {
    // Serialise version numbering and the one-build-at-a-time rule per dataset.
    await tx.execute(sql`select id from datasets where id = ${datasetId} for update`);
    const vs = (
      await tx.execute<{ id: string; number: number; state: VersionState }>(sql`select id, number, state from versions where dataset_id = ${datasetId} order by number desc`)
    ).rows;
    const busy = vs.find((v) => v.state === "processing");
    if (busy) throw conflict(`Version ${busy.number} of this dataset is still processing; wait for it or cancel it first`);
    const head = vs.find((v) => v.state !== "failed" && v.state !== "draft");
    if (input.mode === "append") {
      if (!head) throw conflict("This dataset has no built version to append to; use mode replace for its first version", { mode: ["Nothing to append to"] });
      if (!(builtVersionStates as readonly string[]).includes(head.state)) throw conflict(`Version ${head.number} is ${head.state}; an append builds on the latest built version`);
    }
    const number = (vs[0]?.number ?? 0) + 1;
    const v = (
      await tx.execute<{ id: string; number: number; state: VersionState }>(
        sql`insert into versions (dataset_id, number, state, base_version_id, upload_id, created_by)
            values (${datasetId}, ${number}, 'processing', ${input.mode === "append" ? head!.id : null}, ${input.uploadId}, ${user.id}) returning id, number, state`,
      )
    ).rows[0]!;
    await tx.execute(
      sql`insert into qc_runs (version_id, mode, column_map, settings_overrides) values (${v.id}, ${input.mode}, ${JSON.stringify(input.columnMap)}::jsonb, ${JSON.stringify(input.qcSettings ?? {})}::jsonb)`,
    );
    await writeAudit(tx, { actorId: user.id, action: "version.created", entityType: "version", entityId: v.id, toState: "processing", details: { mode: input.mode, uploadId: input.uploadId, number } });
    return v;
  });
  await queueBuild(created.id);
  return { id: created.id, number: created.number, state: created.state };
}

/**
 * Reads the upload's header the way the build will and refuses a map that names a column the file does not have,
 * before a version number is taken (the build would fail on it at once).
 */
async function assertMapFitsHeader(storageKey: string, originalName: string, map: ColumnMap) {
  try {
    const stream = await openCanonicalStream(pathForKey(storageKey), map, { label: originalName, chunkBytes: 64 << 10 });
    stream.close();
  } catch (e) {
    if (e instanceof InputError) throw new AppError("validation_failed", e.message, 400, { columnMap: [e.message] });
    throw e;
  }
}

async function queueBuild(versionId: string) {
  try {
    const jobId = await enqueueBuild(versionId);
    await pool.query(`update qc_runs set job_id = $2 where version_id = $1`, [versionId, jobId]);
  } catch (e) {
    await finishUnbuilt(versionId, "failed", { message: "The processing queue is not reachable; retry in a moment" }).catch(() => undefined);
    throw new AppError("unavailable", "The processing queue is not reachable; the version is marked failed, retry in a moment", 503, undefined, { cause: e });
  }
}

interface Row {
  id: string;
  number: number;
  state: VersionState;
  dataset_id: string;
  title: string;
  project_id: string;
  upload_id: string | null;
  original_name: string | null;
  base_number: number | null;
  created_at: Date;
  created_by: string | null;
  summary: unknown;
  run_state: VersionProgress["runState"] | null;
  stage: string | null;
  attempt: number | null;
  bytes_total: string | number | null;
  bytes_done: string | number | null;
  rows_done: string | number | null;
  rows_per_s: number | null;
  started_at: Date | null;
  finished_at: Date | null;
  error: VersionProgress["error"];
  cancel_requested: boolean | null;
  counts: unknown;
}

async function loadVersion(user: SessionUser | null | undefined, id: string): Promise<{ row: Row; canControl: boolean }> {
  const { rows } = await pool.query<Row>(
    `select v.id, v.number, v.state, v.dataset_id, d.title, d.project_id, v.upload_id, u.original_name, b.number as base_number, v.created_at,
            cu.name as created_by, v.summary, r.state as run_state, r.stage, r.attempt, r.bytes_total, r.bytes_done, r.rows_done, r.rows_per_s,
            r.started_at, r.finished_at, r.error, r.cancel_requested, r.counts
       from versions v
       join datasets d on d.id = v.dataset_id
       left join uploads u on u.id = v.upload_id
       left join versions b on b.id = v.base_version_id
       left join "user" cu on cu.id = v.created_by
       left join qc_runs r on r.version_id = v.id
      where v.id = $1`,
    [id],
  );
  const row = rows[0];
  const publicState = row && (frozenVersionStates as readonly string[]).includes(row.state) && row.state !== "retracted";
  if (!row) {
    if (!user) throw unauthenticated();
    throw notFound("Version");
  }
  if (publicState) return { row, canControl: false };
  await assertProjectAccess(user, row.project_id, "read");
  return { row, canControl: true };
}

function toProgress(r: Row): VersionProgress | null {
  if (!r.run_state) return null;
  const total = Number(r.bytes_total ?? 0);
  const done = Number(r.bytes_done ?? 0);
  const stage = (r.run_state === "succeeded" ? "done" : (r.stage ?? "queued")) as BuildStage;
  const percent = r.run_state === "succeeded" ? 100 : stage === "summarising" ? 95 : stage === "reading" && total > 0 ? Math.min(90, (90 * done) / total) : 0;
  return {
    versionId: r.id,
    versionState: r.state,
    runState: r.run_state,
    stage,
    attempt: r.attempt ?? 0,
    percent: Math.round(percent * 10) / 10,
    rowsDone: Number(r.rows_done ?? 0),
    rowsPerS: r.rows_per_s === null ? null : Math.round(r.rows_per_s),
    bytesDone: done,
    bytesTotal: total,
    startedAt: iso(r.started_at),
    finishedAt: iso(r.finished_at),
    error: r.error ?? null,
    cancelRequested: !!r.cancel_requested,
  };
}

// GET /api/versions/:id
export async function getVersion(user: SessionUser | null | undefined, id: string): Promise<VersionDetail> {
  const { row, canControl } = await loadVersion(user, id);
  const summary = versionSummaryDataSchema.safeParse(row.summary);
  const report = qcRunReportSchema.safeParse(row.counts);
  let contribute = false;
  if (canControl && user) contribute = user.isAdmin || ["contributor", "curator"].includes((await getProjectRole(user, row.project_id)) ?? "");
  return {
    id: row.id,
    number: row.number,
    state: row.state,
    datasetId: row.dataset_id,
    datasetTitle: row.title,
    projectId: row.project_id,
    uploadId: row.upload_id,
    uploadName: row.original_name,
    baseVersionNumber: row.base_number,
    createdAt: row.created_at.toISOString(),
    createdBy: row.created_by,
    canControl: contribute,
    progress: toProgress(row),
    summary: summary.success ? summary.data : null,
    qcRun: report.success ? report.data : null,
  };
}

// GET /api/versions/:id/progress
export async function getVersionProgress(user: SessionUser | null | undefined, id: string): Promise<VersionProgress> {
  const { row } = await loadVersion(user, id);
  const p = toProgress(row);
  if (!p) throw notFound("Processing run");
  return p;
}

async function controlTarget(user: SessionUser, id: string) {
  const { rows } = await pool.query<{ id: string; number: number; state: VersionState; dataset_id: string; project_id: string }>(
    `select v.id, v.number, v.state, v.dataset_id, d.project_id from versions v join datasets d on d.id = v.dataset_id where v.id = $1`,
    [id],
  );
  const v = rows[0];
  if (!v) throw notFound("Version");
  await assertProjectAccess(user, v.project_id, "contribute");
  return v;
}

// POST /api/versions/:id/cancel
export async function cancelVersion(user: SessionUser, id: string): Promise<VersionProgress> {
  const v = await controlTarget(user, id);
  if (v.state !== "processing") throw conflict(`Version ${v.number} is ${v.state}; only a version that is processing can be cancelled`);
  const r = await pool.query<{ state: string }>(`update qc_runs set cancel_requested = true where version_id = $1 returning state`, [id]);
  await writeAudit(db, { actorId: user.id, action: "version.cancel_requested", entityType: "version", entityId: id, fromState: v.state });
  if (r.rows[0]?.state === "queued") {
    // Not started: stop it now, unless a worker has just locked it (it then sees the request within a second).
    const c = await pool.connect();
    try {
      await c.query("begin");
      const locked = await c.query(`select id from versions where id = $1 and state = 'processing' for update skip locked`, [id]);
      await c.query("commit");
      if (locked.rowCount) await finishUnbuilt(id, "cancelled", { message: "Processing was cancelled; retry to run it again" });
    } finally {
      c.release();
    }
  }
  return getVersionProgress(user, id);
}

// POST /api/versions/:id/retry
export async function retryVersion(user: SessionUser, id: string): Promise<VersionProgress> {
  const v = await controlTarget(user, id);
  await db.transaction(async (tx) => {
    await tx.execute(sql`select id from datasets where id = ${v.dataset_id} for update`);
    const cur = (await tx.execute<{ state: VersionState }>(sql`select state from versions where id = ${id}`)).rows[0]!;
    if (cur.state !== "failed") throw conflict(`Version ${v.number} is ${cur.state}; only a failed or cancelled version can be retried`);
    const other = (
      await tx.execute<{ number: number; state: VersionState }>(
        sql`select number, state from versions where dataset_id = ${v.dataset_id} and id <> ${id} and (number > ${v.number} and state <> 'failed' or state = 'processing') order by number desc limit 1`,
      )
    ).rows[0];
    if (other?.state === "processing") throw conflict(`Version ${other.number} of this dataset is processing; wait for it or cancel it first`);
    if (other) throw conflict(`Version ${other.number} was built after this one; create a new version instead of retrying this one`);
    await tx.execute(sql`update versions set state = 'processing', state_changed_at = now() where id = ${id}`);
    await tx.execute(
      sql`update qc_runs set state = 'queued', stage = 'queued', cancel_requested = false, error = null, bytes_done = 0, rows_done = 0, rows_per_s = null, started_at = null, finished_at = null where version_id = ${id}`,
    );
    await writeAudit(tx, { actorId: user.id, action: "version.retried", entityType: "version", entityId: id, fromState: "failed", toState: "processing" });
  });
  await queueBuild(id);
  return getVersionProgress(user, id);
}

/** The CSV header of `arrayDiagnosticsCsv`: time, how many platforms the plane fit used, then the series in SI units. */
const ARRAY_CSV_HEADER = "time_utc,platforms_used,wind_stress_curl_N_m-3,ekman_pumping_upward_m_s-1,sverdrup_transport_m2_s-1";

/** Every step of a project's array diagnostics as CSV (ISO 8601 UTC times; empty cells where a step has no result). */
export function arrayDiagnosticsCsv(d: ArrayDiagnostics): string {
  const num = (x: number | null | undefined) => (x === null || x === undefined ? "" : String(x));
  const lines = [ARRAY_CSV_HEADER];
  d.time.forEach((t, i) => lines.push([new Date(t * 1000).toISOString(), d.used[i], num(d.curl[i]), num(d.ekmanPumping[i]), num(d.sverdrup[i])].join(",")));
  return lines.join("\n") + "\n";
}

/** The file name of that CSV: the period it covers. */
export function arrayDiagnosticsCsvName(d: ArrayDiagnostics): string {
  const day = (t: number | undefined) => (t === undefined ? "none" : new Date(t * 1000).toISOString().slice(0, 10));
  return `array-diagnostics-${day(d.time[0])}-to-${day(d.time[d.time.length - 1])}.csv`;
}

// GET /api/projects/:id/array-diagnostics (and /api/v1/…)
export async function getArrayDiagnostics(user: SessionUser, projectId: string): Promise<ArrayDiagnostics> {
  await assertProjectAccess(user, projectId, "read");
  const { rows } = await pool.query(`select * from array_diagnostic_series where project_id = $1`, [projectId]);
  const r = rows[0];
  const nul = (a: number[]) => a.map((x) => (Number.isFinite(Number(x)) ? Number(x) : null));
  if (!r)
    return {
      projectId,
      computedAt: null,
      inputs: [],
      stepS: 3600,
      time: [],
      curl: [],
      ekmanPumping: [],
      sverdrup: [],
      used: [],
      note: "Not computed yet: array diagnostics run after a version is built, once three or more moorings or drifters with wind stress overlap in time.",
      caution: CAUTION,
    };
  return {
    projectId,
    computedAt: iso(r.computed_at),
    inputs: (r.inputs as ArrayDiagnostics["inputs"]).map((i) => ({
      datasetId: i.datasetId,
      versionNumber: i.versionNumber,
      title: i.title,
      latitude: i.latitude,
      longitude: i.longitude,
      ...(i.kind ? { kind: i.kind } : {}),
      ...(i.platform ? { platform: i.platform } : {}),
    })),
    stepS: r.step_s,
    time: (r.curl as unknown[]).map((_, j) => r.t0 + j * r.step_s),
    curl: nul(r.curl),
    ekmanPumping: nul(r.ekman_pumping),
    sverdrup: nul(r.sverdrup),
    used: (r.used as number[]).map(Number),
    note: r.note,
    caution: CAUTION,
  };
}
