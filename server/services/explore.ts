import { testLabels, testNames } from "@shared/compute/flags";
import {
  plotQuerySchema,
  qcReportSchema,
  recordsQuerySchema,
  type PlotSeries,
  type PlotWindow,
  type QcReport,
  type QcStretch,
  type RecordColumn,
  type RecordsPage,
  type Track,
} from "@shared/schemas/explore";
import { frozenVersionStates, versionSummaryDataSchema, type VersionSummaryData } from "@shared/schemas/versions";
import type { VersionState } from "@shared/schemas/datasets";
import { derivedVocabulary, vocabulary, type DerivedVariable, type MeasuredVariable } from "@shared/vocabulary";
import { pool } from "../db/client";
import { flagSql } from "../db/record-flags";
import { decodeFlagsAndCounts, readF4, readI2, readI4 } from "../db/plot-arrays";
import { PLOT_STEPS_S } from "../pipeline/summarise";
import { AppError, conflict, forbidden, notFound, unauthenticated } from "../lib/errors";
import type { SessionUser } from "../middleware/require-session";

/**
 * Reading a version's records for people: plot windows (min/max per bucket), records pages, the QC report and the
 * map track. Same access rule as GET /api/versions/:id: released (and superseded) versions are public; every other
 * version only for the project's members and admins.
 */

/** Steps (s) of the pre-aggregated plot series the pipeline writes. */
const SERIES_STEPS = PLOT_STEPS_S;
/** Most records a plot window reads directly (a few tens of milliseconds of heap reads). */
const MAX_RECORD_ROWS = 12_000;
/** States whose records are complete. */
const READABLE: readonly VersionState[] = ["ready", "in_review", "changes_requested", "rejected", "approved", "released", "superseded"];

export interface ReadableVersion {
  id: string;
  number: number;
  state: VersionState;
  datasetId: string;
  projectId: string;
  summary: VersionSummaryData | null;
  /** The version's variables in column order (from its summary). */
  variables: string[];
}

export const unitOf = (v: string) => (v in vocabulary ? vocabulary[v as MeasuredVariable].canonicalUnit : (derivedVocabulary[v as DerivedVariable]?.unit ?? ""));
export const labelOf = (v: string) => (v in vocabulary ? vocabulary[v as MeasuredVariable].label : (derivedVocabulary[v as DerivedVariable]?.longName ?? v));
export const isKnownVariable = (v: string) => v in vocabulary || v in derivedVocabulary;
const q = (col: string) => `"${col.replace(/"/g, "")}"`;

/** Loads a version the caller may read (404/401/403 as for GET /api/versions/:id); 409 when it has no records yet. */
export async function loadReadableVersion(user: SessionUser | null | undefined, id: string): Promise<ReadableVersion> {
  // One round trip for the version and the caller's membership (plot requests are frequent and must stay fast).
  const { rows } = await pool.query(
    `select v.id, v.number, v.state, v.dataset_id, d.project_id, v.summary, m.role
       from versions v join datasets d on d.id = v.dataset_id
       left join memberships m on m.project_id = d.project_id and m.user_id = $2
      where v.id = $1`,
    [id, user?.id ?? null],
  );
  const r = rows[0];
  if (!r) {
    if (!user) throw unauthenticated();
    throw notFound("Version");
  }
  const isPublic = (frozenVersionStates as readonly string[]).includes(r.state) && r.state !== "retracted";
  // Same rule as assertProjectAccess(user, project, "read"): members and admins.
  if (!isPublic) {
    if (!user) throw unauthenticated();
    if (!user.isAdmin && !r.role) throw forbidden("You are not a member of this project");
  }
  if (!READABLE.includes(r.state)) throw conflict(`Version ${r.number} is ${r.state.replace("_", " ")}; it has no records to show${r.state === "processing" ? " yet" : ""}`);
  const s = versionSummaryDataSchema.safeParse(r.summary);
  const summary = s.success ? s.data : null;
  return {
    id: r.id,
    number: r.number,
    state: r.state,
    datasetId: r.dataset_id,
    projectId: r.project_id,
    summary,
    variables: summary ? summary.variables.map((x) => x.variable).filter(isKnownVariable) : [],
  };
}

function checkVariables(v: ReadableVersion, wanted: string[], field = "variables") {
  const bad = wanted.filter((x) => !v.variables.includes(x));
  if (bad.length)
    throw new AppError("validation_failed", `Version ${v.number} has no variable ${bad.join(", ")}`, 400, {
      [field]: [`Unknown here: ${bad.join(", ")}. This version has: ${v.variables.join(", ") || "no variables"}`],
    });
}

const epoch = (iso: string | null | undefined) => (iso ? Date.parse(iso) / 1000 : NaN);
const isoOf = (s: number) => new Date(Math.round(s * 1000)).toISOString();

/**
 * Chooses how to answer a window: the bucket width is span / buckets; windows coarse enough for a pre-aggregated
 * series use it (re-aggregated to a multiple of its step, so bucket edges line up and min/max stay exact), finer
 * ones group the records themselves. Output buckets are aligned to multiples of the width (epoch 0), and the window
 * is widened to whole buckets, so every returned bucket holds all of its records.
 */
export function planWindow(
  fromS: number,
  toS: number,
  buckets: number,
  intervalS: number | null = null,
  platforms = 1,
): { source: "series" | "records"; seriesStep: number | null; stepS: number; from: number; to: number } {
  const w = Math.max((toS - fromS) / buckets, 1);
  // A series serves windows down to half its step (between buckets/2 and buckets points). The records themselves are
  // read only for finer windows holding at most MAX_RECORD_ROWS rows; above that the finest series answers, with
  // fewer, wider buckets (min and max stay exact, so no spike is lost).
  const rows = intervalS ? ((toS - fromS) / intervalS) * platforms : 0;
  const seriesStep = [...SERIES_STEPS].reverse().find((s) => w >= s / 2) ?? (rows > MAX_RECORD_ROWS ? SERIES_STEPS[0] : null);
  const stepS = seriesStep ? Math.ceil(w / seriesStep) * seriesStep : Math.ceil(w);
  const from = Math.floor(fromS / stepS) * stepS;
  const to = Math.ceil(toS / stepS) * stepS;
  return { source: seriesStep ? "series" : "records", seriesStep, stepS, from, to: to > from ? to : from + stepS };
}

// GET /api/versions/:id/plot
export async function getPlotWindow(user: SessionUser | null | undefined, id: string, query: unknown): Promise<PlotWindow> {
  const input = plotQuerySchema.parse(query);
  const v = await loadReadableVersion(user, id);
  checkVariables(v, input.variables);
  const extent = { start: v.summary?.start ?? null, end: v.summary?.end ?? null };
  const platforms = v.summary?.platforms.map((p) => p.id) ?? [];
  const fromS = input.from ? epoch(input.from) : epoch(extent.start);
  const toS = input.to ? epoch(input.to) : epoch(extent.end) + 1;
  if (!Number.isFinite(fromS) || !Number.isFinite(toS)) return { versionId: v.id, from: input.from ?? "", to: input.to ?? "", stepS: 0, source: "records", extent, platforms, series: [] };
  const plan = planWindow(fromS, toS, input.buckets, v.summary?.intervalS ?? null, platformsOf(v, input.platform).length);
  const series = plan.source === "series" ? await seriesBuckets(v, input.variables, input.platform, plan) : await recordBuckets(v, input.variables, input.platform, plan);
  return { versionId: v.id, from: isoOf(plan.from), to: isoOf(plan.to), stepS: plan.stepS, source: plan.source, extent, platforms, series };
}

type Plan = ReturnType<typeof planWindow>;

/** The platforms to read: the one asked for, else all of the version's (so the primary key bounds the time range). */
const platformsOf = (v: ReadableVersion, platform: string | undefined) => (platform !== undefined ? [platform] : (v.summary?.platforms.map((p) => p.id) ?? [""]));

async function seriesBuckets(v: ReadableVersion, variables: string[], platform: string | undefined, plan: Plan): Promise<PlotSeries[]> {
  // PostgreSQL cuts only the window's bytes out of each series' arrays (a few thousand buckets at the level the
  // plan picked; server/db/plot-arrays.ts); the fold into output buckets happens here.
  const step = plan.seriesStep!;
  const { rows } = await pool.query<{ variable: string; platform: string; t0: number; step_s: number; lo: number; mn: Buffer; mx: Buffer; me: Buffer; n: Buffer; wf: Buffer }>({
    text: `select s.variable, s.platform, s.t0, s.step_s, x.lo,
                  substring(s.min from x.lo * 4 + 1 for x.k * 4) as mn, substring(s.max from x.lo * 4 + 1 for x.k * 4) as mx,
                  substring(s.mean from x.lo * 4 + 1 for x.k * 4) as me, substring(s.n from x.lo * 4 + 1 for x.k * 4) as n,
                  substring(s.worst_flag from x.lo * 2 + 1 for x.k * 2) as wf
             from plot_series s,
                  lateral (select greatest(0, floor(($4::float8 - s.t0) / s.step_s)::int) as lo) l,
                  lateral (select l.lo, greatest(0, ceil(($5::float8 - s.t0) / s.step_s)::int - l.lo) as k) x
            where s.version_id = $1 and s.step_s = $2 and s.variable = any($3) and ($6::text is null or s.platform = $6)`,
    values: [v.id, step, variables, plan.from, plan.to, platform ?? null],
  });
  const out = new Map<string, PlotSeries & { sum: number[] }>();
  for (const r of rows) {
    const variable = r.variable;
    const p = r.platform;
    const key = `${p}\u0000${variable}`;
    const MN = readF4(r.mn), MX = readF4(r.mx), ME = readF4(r.me), N = readI4(r.n), WF = readI2(r.wf);
    for (let j = 0; j < N.length; j++) {
      const n = N[j]!;
      if (!(n > 0)) continue;
      const t = r.t0 + (r.lo + j) * r.step_s;
      if (t < plan.from || t >= plan.to) continue;
      let s = out.get(key);
      if (!s) out.set(key, (s = { variable, platform: p, unit: unitOf(variable), t: [], min: [], max: [], mean: [], n: [], worstFlag: [], sum: [] }));
      const b = Math.floor(t / plan.stepS) * plan.stepS;
      const mn = MN[j]!;
      const mx = MX[j]!;
      const wf = WF[j]!;
      const k = s.t.length - 1;
      // A series' buckets come in time order, so a new output bucket starts whenever b moves on.
      if (k < 0 || s.t[k] !== b) {
        s.t.push(b);
        s.min.push(mn);
        s.max.push(mx);
        s.n.push(n);
        s.sum.push(ME[j]! * n);
        s.worstFlag.push(wf === 9 ? 0 : wf);
      } else {
        if (mn < s.min[k]!) s.min[k] = mn;
        if (mx > s.max[k]!) s.max[k] = mx;
        s.n[k]! += n;
        s.sum[k]! += ME[j]! * n;
        if (wf !== 9 && wf > s.worstFlag[k]!) s.worstFlag[k] = wf;
      }
    }
  }
  // Stored extremes are float4: seven significant digits say all they hold, where their exact double expansion would
  // print as 7.331999778747559 for 7.332.
  const f4 = (x: number) => Number(x.toPrecision(7));
  return [...out.values()].map(({ sum, ...s }) => ({ ...s, min: s.min.map(f4), max: s.max.map(f4), mean: sum.map((x, i) => x / s.n[i]!), worstFlag: s.worstFlag.map((f) => f || 9) }));
}

async function recordBuckets(v: ReadableVersion, variables: string[], platform: string | undefined, plan: Plan): Promise<PlotSeries[]> {
  const aggs = variables
    .map((x) => {
      const c = q(x);
      const ok = `${c} <> 'NaN'`;
      const f = flagSql(x);
      return `min(${c}) filter (where ${ok}), max(${c}) filter (where ${ok}), avg(${c}) filter (where ${ok}), count(*) filter (where ${ok}), max(${f}) filter (where ${ok} and ${f} <> 9)`;
    })
    .join(", ");
  const { rows } = await pool.query({
    text: `select platform, floor(extract(epoch from time) / $4)::float8 * $4 as b, ${aggs}
             from records
            where dataset_id = $1 and valid_from <= $2 and (valid_to is null or valid_to > $2)
              and ${platformsOf(v, platform).length === 1 ? "platform = ($3::text[])[1]" : "platform = any($3::text[])"} and time >= to_timestamp($5) and time < to_timestamp($6)
            group by 1, 2 order by 1, 2`,
    // Platforms named explicitly, so the primary key (dataset, platform, time, …) bounds the time range.
    values: [v.datasetId, v.number, platformsOf(v, platform), plan.stepS, plan.from, plan.to],
    rowMode: "array",
  });
  const byPlatform = new Map<string, PlotSeries[]>();
  for (const r of rows as unknown[][]) {
    const p = r[0] as string;
    let list = byPlatform.get(p);
    if (!list) {
      list = variables.map((variable) => ({ variable, platform: p, unit: unitOf(variable), t: [], min: [], max: [], mean: [], n: [], worstFlag: [] }));
      byPlatform.set(p, list);
    }
    const t = Number(r[1]);
    variables.forEach((_, k) => {
      const o = 2 + k * 5;
      const n = Number(r[o + 3]);
      if (!n) return;
      const s = list[k]!;
      s.t.push(t);
      s.min.push(Number(r[o]));
      s.max.push(Number(r[o + 1]));
      s.mean.push(Number(r[o + 2]));
      s.n.push(n);
      s.worstFlag.push(r[o + 4] === null ? 9 : Number(r[o + 4]));
    });
  }
  return [...byPlatform.values()].flat().filter((s) => s.t.length > 0);
}

interface Cursor {
  t: string;
  p: string;
  /** The sort variable's value of the last row, when sorting by a variable. */
  s?: number;
}
const encodeCursor = (c: Cursor) => Buffer.from(JSON.stringify(c)).toString("base64url");
function decodeCursor(s: string): Cursor {
  try {
    const c = JSON.parse(Buffer.from(s, "base64url").toString("utf8"));
    if (typeof c?.t === "string" && typeof c?.p === "string" && !Number.isNaN(Date.parse(c.t)) && (c.s === undefined || Number.isFinite(c.s))) return c;
  } catch {
    /* fall through */
  }
  throw new AppError("validation_failed", "The page cursor is not valid; start again from the first page", 400, { cursor: ["Not a cursor this server gave out"] });
}

export const columnsOf = (vars: string[]): RecordColumn[] => vars.map((key) => ({ key, label: labelOf(key), unit: unitOf(key), derived: key in derivedVocabulary }));

// GET /api/versions/:id/records
export async function getRecordsPage(user: SessionUser | null | undefined, id: string, query: unknown): Promise<RecordsPage> {
  const input = recordsQuerySchema.parse(query);
  const v = await loadReadableVersion(user, id);
  const vars = input.variables ?? v.variables;
  checkVariables(v, vars);
  const values: unknown[] = [v.datasetId, v.number];
  const where = [`dataset_id = $1`, `valid_from <= $2`, `(valid_to is null or valid_to > $2)`];
  const add = (x: unknown) => {
    values.push(x);
    return `$${values.length}`;
  };
  if (input.from) where.push(`time >= ${add(input.from)}::timestamptz`);
  if (input.to) where.push(`time <= ${add(input.to)}::timestamptz`);
  const plats = platformsOf(v, input.platform);
  where.push(plats.length === 1 ? `platform = ${add(plats[0])}` : `platform = any(${add(plats)}::text[])`);
  if (input.flags?.length) {
    const f = add(input.flags);
    where.push(`(${vars.map((x) => `${flagSql(x)} = any(${f}::smallint[])`).join(" or ")})`);
  }
  const dir = input.order === "desc" ? "desc" : "asc";
  // Sorting by a variable: only records with a value of it (PostgreSQL sorts NaN above every number).
  const sort = input.sort;
  if (sort) {
    checkVariables(v, [sort], "sort");
    where.push(`${q(sort)} is not null and ${q(sort)} <> 'NaN'::float8`);
  }
  if (input.cursor) {
    const c = decodeCursor(input.cursor);
    if (sort && c.s === undefined) throw new AppError("validation_failed", "The page cursor is not valid; start again from the first page", 400, { cursor: ["Not a cursor of this order"] });
    const key = sort ? `(${q(sort)}, time, platform)` : `(time, platform)`;
    const at = sort ? `(${add(c.s)}::float8, ${add(c.t)}::timestamptz, ${add(c.p)})` : `(${add(c.t)}::timestamptz, ${add(c.p)})`;
    where.push(`${key} ${dir === "asc" ? ">" : "<"} ${at}`);
  }
  const cols = vars.flatMap((x) => [q(x), flagSql(x)]).join(", ");
  const limit = input.limit;
  const { rows } = await pool.query({
    text: `select to_char(time at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"') as t, platform${sort ? `, ${q(sort)} as s` : ""}${cols ? `, ${cols}` : ""}
             from records where ${where.join(" and ")} order by ${sort ? `${q(sort)} ${dir}, ` : ""}time ${dir}, platform ${dir} limit ${limit + 1}`,
    values,
    rowMode: "array",
  });
  const more = rows.length > limit;
  const page = (rows as unknown[][]).slice(0, limit);
  const o = sort ? 3 : 2;
  const items = page.map((r) => {
    const vals: Record<string, number | null> = {};
    const flags: Record<string, number | null> = {};
    vars.forEach((x, k) => {
      const val = r[o + 2 * k] as number | null;
      vals[x] = val === null || Number.isNaN(val) ? null : val;
      flags[x] = r[o + 1 + 2 * k] as number | null;
    });
    const t = r[0] as string;
    return { time: new Date(t).toISOString(), platform: r[1] as string, values: vals, flags };
  });
  const last = page[page.length - 1];
  const cursor = (r: unknown[]): Cursor => (sort ? { t: r[0] as string, p: r[1] as string, s: r[2] as number } : { t: r[0] as string, p: r[1] as string });
  return { columns: columnsOf(vars), items, nextCursor: more && last ? encodeCursor(cursor(last)) : null };
}

// GET /api/versions/:id/qc-report
export async function getQcReport(user: SessionUser | null | undefined, id: string): Promise<QcReport> {
  const v = await loadReadableVersion(user, id);
  const run = await pool.query(`select counts from qc_runs where version_id = $1`, [v.id]);
  const counts = (run.rows[0]?.counts ?? {}) as { testCounts?: Record<string, Record<string, [number, number]>> };
  const variables = (v.summary?.variables ?? [])
    .filter((x) => isKnownVariable(x.variable))
    .map((x) => ({ key: x.variable, label: labelOf(x.variable), unit: unitOf(x.variable), derived: x.variable in derivedVocabulary, flags: x.flags }));

  // Timeline: hourly worst flags, folded to at most 720 columns (max of each group).
  const hourly = (await pool.query(`select platform, variable, t0, worst_flag, n from plot_series where version_id = $1 and step_s = 3600`, [v.id])).rows.map(decodeFlagsAndCounts);
  let timeline: QcReport["timeline"] = null;
  if (hourly.length) {
    const t0 = Math.min(...hourly.map((r) => r.t0));
    const end = Math.max(...hourly.map((r) => r.t0 + r.worst_flag.length * 3600));
    const fold = Math.max(1, Math.ceil((end - t0) / 3600 / 720));
    const stepS = 3600 * fold;
    const length = Math.ceil((end - t0) / stepS);
    const byVar = new Map<string, number[]>();
    for (const r of hourly) {
      let row = byVar.get(r.variable);
      if (!row) byVar.set(r.variable, (row = new Array(length).fill(0)));
      const off = Math.round((r.t0 - t0) / 3600);
      (r.worst_flag as number[]).forEach((f, j) => {
        if (!r.n[j]) return;
        const k = Math.floor((off + j) / fold);
        const rank = (x: number) => (x === 9 ? 0 : x);
        if (rank(f) > rank(row![k]!)) row![k] = f;
      });
    }
    const order = variables.map((x) => x.key);
    timeline = {
      t0,
      stepS,
      length,
      rows: [...byVar.entries()].sort((a, b) => order.indexOf(a[0]) - order.indexOf(b[0])).map(([variable, worstFlag]) => ({ variable, worstFlag: worstFlag.map((f) => f || 9) })),
    };
  }

  // Worst stretches: runs of minutes holding suspect or failed values (gaps up to 10 minutes bridged).
  const minutes = (await pool.query(`select platform, variable, t0, worst_flag, n from plot_series where version_id = $1 and step_s = 60`, [v.id])).rows.map(decodeFlagsAndCounts);
  const stretches: QcStretch[] = [];
  for (const r of minutes) {
    const wf = r.worst_flag as number[];
    let start = -1;
    let lastHit = -1;
    let hits = 0;
    let worst = 0;
    const close = () => {
      if (start >= 0) stretches.push({ variable: r.variable, platform: r.platform, from: isoOf(r.t0 + start * 60), to: isoOf(r.t0 + (lastHit + 1) * 60), worstFlag: worst, flaggedMinutes: hits });
      start = -1;
      hits = 0;
      worst = 0;
    };
    for (let j = 0; j < wf.length; j++) {
      const f = wf[j]!;
      if (!r.n[j] || (f !== 3 && f !== 4)) continue;
      if (start >= 0 && j - lastHit > 10) close();
      if (start < 0) start = j;
      lastHit = j;
      hits++;
      if (f > worst) worst = f;
    }
    close();
  }
  stretches.sort((a, b) => b.worstFlag - a.worstFlag || b.flaggedMinutes - a.flaggedMinutes);

  const manual = await pool.query(`select count(*)::int as n from annotations where dataset_id = $1 and flag is not null`, [v.datasetId]);
  return qcReportSchema.parse({
    versionId: v.id,
    tests: testNames.map((t) => testLabels[t]),
    variables,
    // The engine keys tests by constant name (FLAT_LINE); reports use the snake_case labels (flat_line).
    testCounts: Object.fromEntries(
      Object.entries(counts.testCounts ?? {}).map(([v, tests]) => [v, Object.fromEntries(Object.entries(tests).map(([t, c]) => [testLabels[t as keyof typeof testLabels] ?? t.toLowerCase(), c]))]),
    ),
    timeline,
    stretches: stretches.slice(0, 20),
    manualFlags: manual.rows[0].n,
  });
}

// GET /api/versions/:id/track
export async function getTrack(user: SessionUser | null | undefined, id: string): Promise<Track> {
  const v = await loadReadableVersion(user, id);
  const dep = await pool.query(
    `select p.kind, dp.name, dp.latitude, dp.longitude, dp.watch_circle_radius_m
       from datasets d left join deployments dp on dp.id = d.deployment_id left join platforms p on p.id = dp.platform_id where d.id = $1`,
    [v.datasetId],
  );
  const d = dep.rows[0];
  const kind: Track["kind"] = d?.kind === "mooring" ? "mooring" : "drifter";
  const tracks: Track["tracks"] = [];
  if (v.variables.includes("latitude") && v.variables.includes("longitude")) {
    const { rows } = await pool.query(
      `select platform, variable, t0, mean, worst_flag, n from plot_series where version_id = $1 and step_s = 3600
          and variable in ('latitude', 'longitude', 'platform_speed_wrt_ground') order by platform`,
      [v.id],
    );
    const byP = new Map<string, Record<string, { t0: number; mean: number[]; wf: number[]; n: number[] }>>();
    for (const r of rows) {
      const m = byP.get(r.platform) ?? {};
      m[r.variable] = { t0: r.t0, mean: Array.from(readF4(r.mean)), wf: Array.from(readI2(r.worst_flag)), n: Array.from(readI4(r.n)) };
      byP.set(r.platform, m);
    }
    for (const [platform, m] of byP) {
      const la = m.latitude;
      const lo = m.longitude;
      if (!la || !lo) continue;
      const sp = m.platform_speed_wrt_ground;
      const points: Track["tracks"][number]["points"] = [];
      for (let j = 0; j < la.mean.length; j++) {
        const t = la.t0 + j * 3600;
        const jo = Math.round((t - lo.t0) / 3600);
        if (!la.n[j] || !lo.n[jo]) continue;
        const js = sp ? Math.round((t - sp.t0) / 3600) : -1;
        const speed = sp && sp.n[js] ? sp.mean[js]! : null;
        const flag = Math.max(la.wf[j] === 9 ? 0 : la.wf[j]!, lo.wf[jo] === 9 ? 0 : lo.wf[jo]!) || 9;
        points.push([t, lo.mean[jo]!, la.mean[j]!, speed, flag]);
      }
      if (points.length) tracks.push({ platform, points });
    }
  }
  return {
    kind,
    deployment: d && d.name ? { name: d.name, latitude: d.latitude, longitude: d.longitude, watchCircleM: d.watch_circle_radius_m } : null,
    tracks,
  };
}
