import type pg from "pg";
import { computeDiagnostics, type DeploymentContext } from "@shared/compute/diagnostics";
import { resolveQcSettings, type QcSettings } from "@shared/schemas/qc-settings";
import {
  annotationSchema,
  createAnnotationInputSchema,
  updateAnnotationInputSchema,
  type Annotation,
  type AnnotationResult,
} from "@shared/schemas/annotations";
import type { VersionState } from "@shared/schemas/datasets";
import { derivedVariables, measuredVariables, type DerivedVariable, type MeasuredVariable } from "@shared/vocabulary";
import { pool } from "../db/client";
import { flagSql, recordVariables, setFlagsSql } from "../db/record-flags";
import { decodeFlagsAndCounts, writeI2 } from "../db/plot-arrays";
import { ensureRecordPartition } from "../db/record-partitions";
import { AppError, notFound, unauthenticated } from "../lib/errors";
import type { SessionUser } from "../middleware/require-session";
import { assertProjectAccess } from "./access";
import { isKnownVariable } from "./explore";

/**
 * Annotations and manual flags. A flag annotation sets a variable's flag (its byte of `flags`) over its time range in
 * the dataset's editable version (ready or changes requested) and in every later build (the pipeline calls
 * `applyManualFlags`). Records are shared between versions, so a row an earlier version also sees is never changed
 * in place: it is closed at this version (valid_to = N) and a flagged copy starts here (valid_from = N), in the
 * caller's transaction. The flag a manual one replaced is kept in manual_flag_originals, so editing or deleting the
 * annotation gives it back.
 */

/** Version states whose records a manual flag may change now. */
const EDITABLE: readonly VersionState[] = ["ready", "changes_requested"];

const ALL_COLUMNS = [...recordVariables, "flags"];
const q = (c: string) => `"${c.replace(/"/g, "")}"`;

export interface FlagRange {
  platform: string | null;
  from: string;
  to: string;
  variables: string[];
}

export interface ApplyOptions {
  /** The version's id, to patch its plot series and summary (omit inside a build: it summarises afterwards). */
  versionId?: string;
  /** Resolved QC settings and deployment context for re-deriving flags (read from the version when omitted). */
  settings?: QcSettings;
  ctx?: DeploymentContext;
  /** Inside a build: every row starting at this version was just computed, so its flag is the automatic one. */
  fresh?: boolean;
  /** Ranges an edit or deletion took away: their records get their automatic flags back unless another annotation covers them. */
  released?: FlagRange[];
}

/**
 * Makes version `versionNumber` of a dataset carry the dataset's manual flags: for each record and variable in any
 * flag annotation's range (and in `opts.released`), the wanted flag is the most recently edited covering
 * annotation's, else the automatic one. Changed rows shared with earlier versions are copied (copy-on-write);
 * derived variables then take the worst flag of their inputs again (computeDiagnostics, the engine's own rules).
 * Idempotent: a second call changes nothing. Cost O(rows in the ranges).
 */
export async function applyManualFlags(tx: pg.ClientBase, datasetId: string, versionNumber: number, opts: ApplyOptions = {}): Promise<{ rowsChanged: number }> {
  const N = versionNumber;
  const anns = await tx.query<{ platform: string | null; from: string; to: string; variables: string[] }>(
    `select platform, start_time::text as from, end_time::text as to, variables from annotations where dataset_id = $1 and flag is not null`,
    [datasetId],
  );
  const ranges: FlagRange[] = [...anns.rows, ...(opts.released ?? [])];
  if (!ranges.length) return { rowsChanged: 0 };
  // The planner must know how many records this version has. Right after a build the table's statistics still
  // describe it before the build, a new version looks like one row, and the planner loops the whole version
  // against every change: measured 8 s per UPDATE and 30 s for re-deriving a day and a half of 1-minute flags on a
  // month of data, against ~30 ms with statistics (PostgreSQL manual, "Populating a Database": run ANALYZE after
  // bulk loads). A coarse sample of the key columns of this version's own partition is enough (~40 ms on 2.7 M
  // records); earlier versions' partitions keep the statistics autovacuum gave them.
  const part = await ensureRecordPartition(tx, datasetId, N);
  await tx.query(`set local default_statistics_target = 10`);
  await tx.query(`analyze ${part} (dataset_id, platform, "time", valid_from, valid_to)`);
  await tx.query(`reset default_statistics_target`);
  await tx.query(`create temp table if not exists mf_changes (platform text, time timestamptz, valid_from int, cur smallint, want smallint) on commit drop`);
  await tx.query(`create temp table if not exists mf_touched (platform text, time timestamptz, primary key (platform, time)) on commit drop`);
  await tx.query(`truncate mf_touched`);
  const deltas = new Map<string, Map<string, number>>();
  const noteDelta = (v: string, from: number | null, to: number, n: number) => {
    const m = deltas.get(v) ?? new Map<string, number>();
    m.set(`${from ?? 9}>${to}`, (m.get(`${from ?? 9}>${to}`) ?? 0) + n);
    deltas.set(v, m);
  };
  let rowsChanged = 0;
  const byVariable = new Map<string, FlagRange[]>();
  for (const r of ranges) for (const v of r.variables) if (isKnownVariable(v)) byVariable.set(v, [...(byVariable.get(v) ?? []), r]);

  for (const [variable, rs] of byVariable) {
    const c = q(variable);
    const f = flagSql(variable, "r.");
    await tx.query(`truncate mf_changes`);
    for (const r of rs) {
      // The wanted flag of each visible row in this range; only rows where it differs are kept.
      await tx.query(
        `insert into mf_changes (platform, time, valid_from, cur, want)
         select x.platform, x.time, x.valid_from, x.cur, x.want from (
           select r.platform, r.time, r.valid_from, ${f} as cur,
                  coalesce(
                    (select a.flag from annotations a
                      where a.dataset_id = $1 and a.flag is not null and $3 = any(a.variables) and r.time between a.start_time and a.end_time
                        and (a.platform is null or a.platform = r.platform)
                      order by a.updated_at desc, a.id desc limit 1),
                    case when $7 and r.valid_from = $2 then ${f} end,
                    (select o.flag from manual_flag_originals o
                      where o.dataset_id = $1 and o.platform = r.platform and o.variable = $3 and o.time = r.time and o.version_number <= $2
                      order by o.version_number desc limit 1),
                    ${f}) as want
             from records r
            where r.dataset_id = $1 and r.valid_from <= $2 and (r.valid_to is null or r.valid_to > $2)
              and r.time between $4::timestamptz and $5::timestamptz and ($6::text is null or r.platform = $6) and r.${c} is not null
         ) x
         where x.cur is distinct from x.want
           and not exists (select 1 from mf_changes m where m.platform = x.platform and m.time = x.time)`,
        [datasetId, N, variable, r.from, r.to, r.platform, !!opts.fresh],
      );
    }
    const counted = await tx.query(`select cur, want, count(*)::int as n from mf_changes group by 1, 2`);
    if (!counted.rows.length) continue;
    for (const r of counted.rows) noteDelta(variable, r.cur, r.want, r.n);
    // Keep the automatic flag before the first manual change of this row in this version.
    await tx.query(
      `insert into manual_flag_originals (dataset_id, version_number, platform, time, variable, flag)
       select $1, $2, m.platform, m.time, $3, m.cur from mf_changes m
        where m.cur is not null and ((${opts.fresh ? "true" : "false"} and m.valid_from = $2) or not exists (
          select 1 from manual_flag_originals o where o.dataset_id = $1 and o.platform = m.platform and o.variable = $3 and o.time = m.time and o.version_number <= $2))
       on conflict (dataset_id, platform, variable, time, version_number) do ${opts.fresh ? "update set flag = excluded.flag" : "nothing"}`,
      [datasetId, N, variable],
    );
    await copyOnWrite(tx, datasetId, N);
    const upd = await tx.query(
      `update records r set flags = ${setFlagsSql([{ variable, value: "m.want" }], "r.")} from mf_changes m where r.dataset_id = $1 and r.platform = m.platform and r.time = m.time and r.valid_from = $2`,
      [datasetId, N],
    );
    rowsChanged += upd.rowCount ?? 0;
    await tx.query(`insert into mf_touched (platform, time) select platform, time from mf_changes on conflict do nothing`);
  }
  if (rowsChanged === 0) return { rowsChanged };

  const { settings, ctx } = opts.settings && opts.ctx ? { settings: opts.settings, ctx: opts.ctx } : await loadContext(tx, datasetId, N);
  await rederive(tx, datasetId, N, settings, ctx, noteDelta);
  if (opts.versionId) {
    await patchPlotSeries(tx, datasetId, N, opts.versionId);
    await patchSummary(tx, opts.versionId, deltas);
  }
  return { rowsChanged };
}

/** Closes at N every row listed in mf_changes that an earlier version shares, and inserts its copy starting at N. */
async function copyOnWrite(tx: pg.ClientBase, datasetId: string, N: number) {
  const cols = ALL_COLUMNS.map(q).join(", ");
  await tx.query(
    `with src as (
       update records r set valid_to = $2 from mf_changes m
        where r.dataset_id = $1 and r.platform = m.platform and r.time = m.time and r.valid_from = m.valid_from and m.valid_from < $2 and r.valid_to is null
       returning r.*)
     insert into records (dataset_id, platform, time, valid_from, valid_to, ${cols}) select dataset_id, platform, time, $2, null, ${cols} from src`,
    [datasetId, N],
  );
  await tx.query(`update mf_changes set valid_from = $1 where valid_from < $1`, [N]);
}

async function loadContext(tx: pg.ClientBase, datasetId: string, N: number): Promise<{ settings: QcSettings; ctx: DeploymentContext }> {
  const { rows } = await tx.query(
    `select r.settings, dp.latitude, dp.longitude, dp.anemometer_height_m, dp.current_meter_depth_m, dp.coastline_offshore_bearing_deg, p.kind
       from datasets d left join versions v on v.dataset_id = d.id and v.number = $2 left join qc_runs r on r.version_id = v.id
       left join deployments dp on dp.id = d.deployment_id left join platforms p on p.id = dp.platform_id where d.id = $1`,
    [datasetId, N],
  );
  const r = rows[0] ?? {};
  const parsed = resolveQcSettings((r.settings ?? {}) as never);
  const num = (x: unknown) => (x === null || x === undefined ? undefined : Number(x));
  return {
    settings: parsed.success ? parsed.data : resolveQcSettings({}).data!,
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

/** Re-derives the flags of derived variables on every touched row (all of which now start at version N). */
async function rederive(tx: pg.ClientBase, datasetId: string, N: number, settings: QcSettings, ctx: DeploymentContext, noteDelta: (v: string, a: number | null, b: number, n: number) => void) {
  const drift = ["surface_eastward_sea_water_velocity", "surface_northward_sea_water_velocity", "platform_speed_wrt_ground"] as const;
  const cols = [...measuredVariables, ...derivedVariables].flatMap((v) => [`r.${q(v)}`, flagSql(v, "r.")]).join(", ");
  const BATCH = 20000;
  let after: [string, string] | null = null;
  for (;;) {
    const { rows } = await tx.query({
      text: `select r.platform, r.time::text, ${cols} from records r join mf_touched t on t.platform = r.platform and t.time = r.time
              where r.dataset_id = $1 and r.valid_from = $2 ${after ? `and (r.platform, r.time) > ($3, $4::timestamptz)` : ""}
              order by r.platform, r.time limit ${BATCH}`,
      values: after ? [datasetId, N, after[0], after[1]] : [datasetId, N],
      rowMode: "array",
    });
    if (!rows.length) break;
    const n = rows.length;
    const values: Partial<Record<MeasuredVariable, Float64Array>> = {};
    const flags: Partial<Record<MeasuredVariable, Uint8Array>> = {};
    measuredVariables.forEach((v, k) => {
      if ((rows as unknown[][]).every((r) => r[2 + 2 * k] === null)) return;
      values[v] = Float64Array.from(rows as unknown[][], (r) => (r[2 + 2 * k] === null ? NaN : Number(r[2 + 2 * k])));
      flags[v] = Uint8Array.from(rows as unknown[][], (r) => (r[3 + 2 * k] === null ? 9 : Number(r[3 + 2 * k])));
    });
    const d0 = 2 + 2 * measuredVariables.length;
    const dIdx = (v: DerivedVariable) => d0 + 2 * derivedVariables.indexOf(v);
    const hasDrift = (rows as unknown[][]).some((r) => r[dIdx("surface_eastward_sea_water_velocity")] !== null);
    const col = (v: DerivedVariable) => Float64Array.from(rows as unknown[][], (r) => (r[dIdx(v)] === null ? NaN : Number(r[dIdx(v)])));
    const out = computeDiagnostics(
      {
        n,
        values,
        flags,
        drift: hasDrift
          ? {
              u: col(drift[0]),
              v: col(drift[1]),
              speed: col(drift[2]),
              flag: Uint8Array.from(rows as unknown[][], (r) => (r[dIdx(drift[0]) + 1] === null ? 9 : Number(r[dIdx(drift[0]) + 1]))),
            }
          : undefined,
      },
      settings,
      ctx,
    );
    // One UPDATE per batch sets every derived flag that changed: a row is rewritten once, not once per variable.
    const changedCols: { name: DerivedVariable; flags: (number | null)[] }[] = [];
    const rowChanged = new Uint8Array(n);
    for (const [name, nf] of Object.entries(out.flags) as [DerivedVariable, Uint8Array][]) {
      const i = dIdx(name);
      const next: (number | null)[] = new Array(n).fill(null);
      const counts = new Map<string, number>();
      (rows as unknown[][]).forEach((r, k) => {
        if (r[i] === null) return; // not part of this build
        const old = r[i + 1] as number | null;
        if (old === nf[k]) return;
        next[k] = nf[k]!;
        rowChanged[k] = 1;
        const key = `${old}|${nf[k]}`;
        counts.set(key, (counts.get(key) ?? 0) + 1);
      });
      if (!counts.size) continue;
      for (const [key, c] of counts) {
        const [a, b] = key.split("|");
        noteDelta(name, a === "null" ? null : Number(a), Number(b), c);
      }
      changedCols.push({ name, flags: next });
    }
    if (changedCols.length) {
      const pick = [...rowChanged.keys()].filter((k) => rowChanged[k]);
      const sets = `flags = ${setFlagsSql(changedCols.map((c, j) => ({ variable: c.name, value: `x.f${j}` })), "r.")}`;
      const arrays = changedCols.map((_, j) => `$${5 + j}::smallint[]`).join(", ");
      const names = changedCols.map((_, j) => `f${j}`).join(", ");
      await tx.query(
        `update records r set ${sets} from unnest($3::text[], $4::timestamptz[], ${arrays}) as x(p, t, ${names})
          where r.dataset_id = $1 and r.valid_from = $2 and r.platform = x.p and r.time = x.t`,
        [datasetId, N, pick.map((k) => (rows[k] as unknown[])[0]), pick.map((k) => (rows[k] as unknown[])[1]), ...changedCols.map((c) => pick.map((k) => c.flags[k]))],
      );
    }
    if (n < BATCH) break;
    const last = rows[n - 1] as unknown[];
    after = [last[0] as string, last[1] as string];
  }
}

/** Recomputes the worst flag of the plot buckets the touched rows fall in (values, hence min/max/mean, are unchanged). */
async function patchPlotSeries(tx: pg.ClientBase, datasetId: string, N: number, versionId: string) {
  const spans = await tx.query(`select platform, extract(epoch from min(time))::float8 as lo, extract(epoch from max(time))::float8 as hi from mf_touched group by platform`);
  if (!spans.rows.length) return;
  const series = (await tx.query(`select platform, variable, step_s, t0, worst_flag, n from plot_series where version_id = $1`, [versionId])).rows.map(decodeFlagsAndCounts);
  if (!series.length) return;
  const variables = [...new Set(series.map((r) => r.variable as string))].filter(isKnownVariable);
  for (const step of [...new Set(series.map((r) => r.step_s as number))]) {
    for (const span of spans.rows) {
      const lo = Math.floor(span.lo / step) * step;
      const hi = Math.floor(span.hi / step) * step + step;
      const aggs = variables.map((v) => `max(${flagSql(v)}) filter (where ${q(v)} <> 'NaN' and ${flagSql(v)} <> 9)`).join(", ");
      const { rows } = await tx.query({
        text: `select floor(extract(epoch from time) / $4)::float8 * $4 as b, ${aggs} from records
                where dataset_id = $1 and valid_from <= $2 and (valid_to is null or valid_to > $2) and platform = $3
                  and time >= to_timestamp($5) and time < to_timestamp($6) group by 1`,
        values: [datasetId, N, span.platform, step, lo, hi],
        rowMode: "array",
      });
      for (const s of series.filter((r) => r.step_s === step && r.platform === span.platform)) {
        const k = variables.indexOf(s.variable);
        if (k < 0) continue;
        const wf = s.worst_flag as number[];
        let changed = false;
        for (const r of rows as unknown[][]) {
          const j = Math.round((Number(r[0]) - s.t0) / step);
          if (j < 0 || j >= wf.length || !s.n[j]) continue;
          const f = r[1 + k] === null ? 9 : Number(r[1 + k]);
          if (wf[j] !== f) {
            wf[j] = f;
            changed = true;
          }
        }
        if (changed)
          await tx.query(`update plot_series set worst_flag = $5 where version_id = $1 and platform = $2 and variable = $3 and step_s = $4`, [versionId, s.platform, s.variable, step, writeI2(wf)]);
      }
    }
  }
}

/** Moves the version summary's flag counts by what the manual flags changed. */
async function patchSummary(tx: pg.ClientBase, versionId: string, deltas: Map<string, Map<string, number>>) {
  const { rows } = await tx.query(`select summary from versions where id = $1`, [versionId]);
  const summary = rows[0]?.summary as { variables?: { variable: string; flags: number[] }[] } | null;
  if (!summary?.variables) return;
  for (const v of summary.variables) {
    const m = deltas.get(v.variable);
    if (!m) continue;
    for (const [key, n] of m) {
      const [a, b] = key.split(">").map(Number) as [number, number];
      v.flags[a] = Math.max(0, (v.flags[a] ?? 0) - n);
      v.flags[b] = (v.flags[b] ?? 0) + n;
    }
  }
  await tx.query(`update versions set summary = $2 where id = $1`, [versionId, summary]);
}

// ---- Annotation use cases ----

interface AnnotationRow {
  id: string;
  dataset_id: string;
  version_id: string | null;
  platform: string | null;
  start_time: Date;
  end_time: Date;
  variables: string[];
  note: string;
  flag: number | null;
  reason: string | null;
  created_by: string | null;
  created_at: Date;
  updated_at: Date;
}

const toAnnotation = (r: AnnotationRow): Annotation =>
  annotationSchema.parse({
    id: r.id,
    datasetId: r.dataset_id,
    versionId: r.version_id,
    platform: r.platform,
    from: r.start_time.toISOString(),
    to: r.end_time.toISOString(),
    variables: r.variables,
    note: r.note,
    flag: r.flag,
    reason: r.reason,
    createdBy: r.created_by,
    createdAt: r.created_at.toISOString(),
    updatedAt: r.updated_at.toISOString(),
  });

const SELECT = `select a.id, a.dataset_id, a.version_id, a.platform, a.start_time, a.end_time, a.variables, a.note, a.flag, a.reason, u.name as created_by, a.created_at, a.updated_at
                  from annotations a left join "user" u on u.id = a.created_by`;

async function datasetProject(user: SessionUser | null | undefined, datasetId: string): Promise<string> {
  const { rows } = await pool.query(`select project_id from datasets where id = $1`, [datasetId]);
  if (!rows[0]) {
    if (!user) throw unauthenticated();
    throw notFound("Dataset");
  }
  return rows[0].project_id;
}

function checkVariableNames(vars: string[] | undefined) {
  const bad = (vars ?? []).filter((v) => !isKnownVariable(v));
  if (bad.length) throw new AppError("validation_failed", `Unknown variable ${bad.join(", ")}`, 400, { variables: [`Not a Tauline variable: ${bad.join(", ")}`] });
}

// GET /api/datasets/:id/annotations
export async function listAnnotations(user: SessionUser, datasetId: string): Promise<{ items: Annotation[] }> {
  await assertProjectAccess(user, await datasetProject(user, datasetId), "read");
  const { rows } = await pool.query<AnnotationRow>(`${SELECT} where a.dataset_id = $1 order by a.start_time, a.created_at`, [datasetId]);
  return { items: rows.map(toAnnotation) };
}

/** The version manual flags change now: the newest built version if it is ready or has changes requested. */
async function targetVersion(tx: pg.ClientBase, datasetId: string): Promise<{ id: string; number: number; state: VersionState } | null> {
  const { rows } = await tx.query(
    `select id, number, state from versions where dataset_id = $1 and state not in ('failed', 'draft') order by number desc limit 1 for update`,
    [datasetId],
  );
  return rows[0] ?? null;
}

async function applyNow(tx: pg.ClientBase, datasetId: string, released: FlagRange[]): Promise<Pick<AnnotationResult, "applied" | "note">> {
  const v = await targetVersion(tx, datasetId);
  if (!v) return { applied: null, note: "No version has records yet; the flag applies when the first version is built" };
  if (!EDITABLE.includes(v.state))
    return {
      applied: null,
      note:
        v.state === "processing"
          ? `Version ${v.number} is processing; the flag applies when it finishes`
          : `Version ${v.number} is ${v.state.replace("_", " ")} and cannot change; the flag applies to the next version built`,
    };
  const r = await applyManualFlags(tx, datasetId, v.number, { versionId: v.id, released });
  return { applied: { versionId: v.id, versionNumber: v.number, rowsChanged: r.rowsChanged }, note: null };
}

async function audit(tx: pg.ClientBase, actorId: string, action: string, id: string, details: unknown, reason?: string | null) {
  await tx.query(`insert into audit_log (actor_id, action, entity_type, entity_id, reason, details) values ($1, $2, 'annotation', $3, $4, $5)`, [
    actorId,
    action,
    id,
    reason ?? null,
    details,
  ]);
}

async function inTransaction<T>(fn: (tx: pg.PoolClient) => Promise<T>): Promise<T> {
  const c = await pool.connect();
  try {
    await c.query("begin");
    const out = await fn(c);
    await c.query("commit");
    return out;
  } catch (e) {
    await c.query("rollback").catch(() => undefined);
    throw e;
  } finally {
    c.release();
  }
}

// POST /api/datasets/:id/annotations
export async function createAnnotation(user: SessionUser, datasetId: string, body: unknown): Promise<AnnotationResult> {
  const input = createAnnotationInputSchema.parse(body);
  await assertProjectAccess(user, await datasetProject(user, datasetId), "contribute");
  checkVariableNames(input.variables);
  if (input.versionId) {
    const ok = await pool.query(`select 1 from versions where id = $1 and dataset_id = $2`, [input.versionId, datasetId]);
    if (!ok.rowCount) throw new AppError("validation_failed", "That version is not a version of this dataset", 400, { versionId: ["Not a version of this dataset"] });
  }
  return inTransaction(async (tx) => {
    const { rows } = await tx.query<{ id: string }>(
      `insert into annotations (dataset_id, version_id, platform, start_time, end_time, variables, note, flag, reason, created_by, updated_by)
       values ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $10) returning id`,
      [datasetId, input.versionId ?? null, input.platform ?? null, input.from, input.to, input.variables, input.note, input.flag, input.flag ? input.reason : null, user.id],
    );
    const id = rows[0]!.id;
    const result = input.flag ? await applyNow(tx, datasetId, []) : { applied: null, note: null };
    await audit(tx, user.id, "annotation.created", id, { ...input, applied: result.applied }, input.flag ? input.reason : null);
    const a = await tx.query<AnnotationRow>(`${SELECT} where a.id = $1`, [id]);
    return { annotation: toAnnotation(a.rows[0]!), ...result };
  });
}

async function loadForChange(user: SessionUser, id: string): Promise<AnnotationRow> {
  const { rows } = await pool.query<AnnotationRow>(`select * from annotations where id = $1`, [id]);
  const a = rows[0];
  if (!a) {
    if (!user) throw unauthenticated();
    throw notFound("Annotation");
  }
  await assertProjectAccess(user, await datasetProject(user, a.dataset_id), "contribute");
  return a;
}

const rangeOf = (a: AnnotationRow): FlagRange => ({ platform: a.platform, from: a.start_time.toISOString(), to: a.end_time.toISOString(), variables: a.variables });

// PATCH /api/annotations/:id
export async function updateAnnotation(user: SessionUser, id: string, body: unknown): Promise<AnnotationResult> {
  const input = updateAnnotationInputSchema.parse(body);
  checkVariableNames(input.variables);
  const before = await loadForChange(user, id);
  const flag = input.flag === undefined ? before.flag : input.flag;
  const reason = input.reason ?? before.reason;
  if (flag && (reason?.trim().length ?? 0) < 3) throw new AppError("validation_failed", "Give a reason for the manual flag", 400, { reason: ["Give a reason (at least 3 characters) for the manual flag"] });
  const from = input.from ?? before.start_time.toISOString();
  const to = input.to ?? before.end_time.toISOString();
  if (Date.parse(to) < Date.parse(from)) throw new AppError("validation_failed", "to must not be before from", 400, { to: ["to must not be before from"] });
  return inTransaction(async (tx) => {
    await tx.query(
      `update annotations set start_time = $2, end_time = $3, variables = $4, note = $5, flag = $6, reason = $7, updated_by = $8, updated_at = clock_timestamp() where id = $1`,
      [id, from, to, input.variables ?? before.variables, input.note ?? before.note, flag, flag ? reason : null, user.id],
    );
    const flagsMoved = before.flag !== null || flag !== null;
    const result = flagsMoved ? await applyNow(tx, before.dataset_id, before.flag !== null ? [rangeOf(before)] : []) : { applied: null, note: null };
    await audit(tx, user.id, "annotation.updated", id, { before: toAnnotation({ ...before, created_by: null }), changes: input, applied: result.applied }, input.reason ?? null);
    const a = await tx.query<AnnotationRow>(`${SELECT} where a.id = $1`, [id]);
    return { annotation: toAnnotation(a.rows[0]!), ...result };
  });
}

// DELETE /api/annotations/:id
export async function deleteAnnotation(user: SessionUser, id: string): Promise<Pick<AnnotationResult, "applied" | "note">> {
  const before = await loadForChange(user, id);
  return inTransaction(async (tx) => {
    await tx.query(`delete from annotations where id = $1`, [id]);
    const result = before.flag !== null ? await applyNow(tx, before.dataset_id, [rangeOf(before)]) : { applied: null, note: null };
    await audit(tx, user.id, "annotation.deleted", id, { before: toAnnotation({ ...before, created_by: null }), applied: result.applied });
    return result;
  });
}
