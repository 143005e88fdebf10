import { z } from "zod";
import { arrayDiagnostics } from "@shared/compute/array";
import { haversine } from "@shared/compute/geodesy";
import { idSchema } from "@shared/schemas/common";
import { builtVersionStates } from "@shared/schemas/versions";
import { pool } from "../db/client";
import { flagSql } from "../db/record-flags";
import { logger } from "../lib/logger";
import type { JobDefinition } from "./index";
import { enqueue } from "./queue";

/**
 * Array diagnostics for a project's moorings and drifter clusters (PRODUCT.md, Science): at each common hourly step
 * where three or more of them have a wind stress, the engine's least-squares plane fit gives wind-stress curl,
 * Ekman pumping and Sverdrup transport (shared/compute/array.ts, DOMAIN §9). See computeArrayDiagnostics.
 */
export const ARRAY_DIAGNOSTICS = "array-diagnostics";
const payloadSchema = z.object({ projectId: idSchema });
export const ARRAY_STEP_S = 3600;
/**
 * The most an array's moorings may lie from its centre mooring, km. A plane fit over moorings an ocean apart is
 * not a local curl (and its local x, y coordinates no longer hold); moorings further out are left out and named.
 * Common practice for regional arrays (tens to a few hundred km); not from a single source.
 */
export const ARRAY_MAX_RADIUS_KM = 500;

const DEG = Math.PI / 180;

/**
 * SQL for the mean of `longitude` over a group as a direction (the mean of unit vectors, common practice for
 * angles), in (−180°, 180°]: a drifter crossing the date line within an hour stays by the date line, where a plain
 * average of 179.99° and −179.99° would put it at 0°. `filter` is the aggregate's FILTER clause, or "".
 */
function meanLongitudeSql(filter: string): string {
  return `degrees(atan2(avg(sin(radians(longitude))) ${filter}, avg(cos(radians(longitude))) ${filter}))`;
}

export function enqueueArrayDiagnostics(projectId: string) {
  return enqueue(ARRAY_DIAGNOSTICS, { projectId }, { retryLimit: 3, retryDelay: 5 });
}

/** One platform of the array: a mooring (fixed position) or one drifter of a fleet (its position each hour). */
interface Member {
  datasetId: string;
  versionId: string;
  versionNumber: number;
  title: string;
  kind: "mooring" | "drifter";
  /** The drifter's id within its fleet; "" for a mooring. */
  platform: string;
}
/** A member's hourly means: position and wind stress. */
interface Obs {
  latitude: number;
  longitude: number;
  x: number;
  y: number;
}

/**
 * The array's platforms: the centre is the one with the most others within ARRAY_MAX_RADIUS_KM (ties: the
 * smallest summed distance), and the array is it and those others. Great-circle distances, so the date line is no
 * edge. O(n²) in the project's moorings.
 */
export function arrayMembers<T extends { latitude: number; longitude: number }>(all: T[]): { inputs: T[]; leftOut: { input: T; km: number }[] } {
  if (all.length === 0) return { inputs: [], leftOut: [] };
  const km = (a: T, b: T) => haversine(a.latitude, a.longitude, b.latitude, b.longitude) / 1000;
  let best = 0;
  let bestCount = -1;
  let bestSum = Infinity;
  all.forEach((a, i) => {
    const d = all.map((b) => km(a, b));
    const count = d.filter((x) => x <= ARRAY_MAX_RADIUS_KM).length;
    const sum = d.reduce((s, x) => s + x, 0);
    if (count > bestCount || (count === bestCount && sum < bestSum)) [best, bestCount, bestSum] = [i, count, sum];
  });
  const centre = all[best]!;
  const inputs: T[] = [];
  const leftOut: { input: T; km: number }[] = [];
  for (const x of all) {
    const d = km(centre, x);
    if (d <= ARRAY_MAX_RADIUS_KM) inputs.push(x);
    else leftOut.push({ input: x, km: d });
  }
  return { inputs, leftOut };
}

/**
 * Computes and stores the project's array series (idempotent: replaces the previous result). Members are its
 * moorings at their deployment's position and the drifters of its fleets at their hourly mean position, each
 * from its dataset's latest built version, with hourly mean wind stress over values flagged pass or not
 * evaluated. At each hour the array is the members within ARRAY_MAX_RADIUS_KM of a centre (`arrayMembers`), and a
 * step is computed when three or more have stress. Longitudes are averaged plainly (a drifter crossing the date
 * line within an hour would be misplaced for that hour).
 */
export async function computeArrayDiagnostics(projectId: string): Promise<{ steps: number; note: string | null }> {
  const { rows } = await pool.query(
    `select distinct on (d.id) d.id as dataset_id, d.title, v.id as version_id, v.number, p.kind, dp.latitude, dp.longitude
       from datasets d
       join deployments dp on dp.id = d.deployment_id
       join platforms p on p.id = dp.platform_id
       join versions v on v.dataset_id = d.id and v.state = any($2::version_state[])
      where d.project_id = $1 and (p.kind = 'drifter' or (dp.latitude is not null and dp.longitude is not null))
      order by d.id, v.number desc`,
    [projectId, builtVersionStates],
  );
  const good = (v: string) => `${flagSql(v)} in (1, 2) and ${v} <> 'NaN'`;
  const members: Member[] = [];
  const byStep = new Map<number, Map<number, Obs>>();
  for (const r of rows) {
    const drifter = r.kind === "drifter";
    const s = await pool.query(
      `select platform, floor(extract(epoch from time) / $3)::float8 * $3 as t,
              avg(surface_downward_eastward_stress) filter (where ${good("surface_downward_eastward_stress")}) as x,
              avg(surface_downward_northward_stress) filter (where ${good("surface_downward_northward_stress")}) as y
              ${drifter ? `, avg(latitude) filter (where ${good("latitude")}) as lat, ${meanLongitudeSql(`filter (where ${good("longitude")})`)} as lon` : ""}
         from records
        where dataset_id = $1 and valid_from <= $2 and (valid_to is null or valid_to > $2) ${drifter ? "" : "and platform = ''"}
        group by 1, 2`,
      [r.dataset_id, r.number, ARRAY_STEP_S],
    );
    const index = new Map<string, number>();
    for (const q of s.rows) {
      const o: Obs = {
        latitude: Number(drifter ? q.lat : r.latitude),
        longitude: Number(drifter ? q.lon : r.longitude),
        x: q.x === null ? NaN : Number(q.x),
        y: q.y === null ? NaN : Number(q.y),
      };
      if (![o.latitude, o.longitude, o.x, o.y].every(Number.isFinite) || (drifter && (q.lat === null || q.lon === null))) continue;
      let k = index.get(q.platform);
      if (k === undefined) {
        k = members.push({ datasetId: r.dataset_id, versionId: r.version_id, versionNumber: r.number, title: r.title, kind: drifter ? "drifter" : "mooring", platform: q.platform }) - 1;
        index.set(q.platform, k);
      }
      const t = Number(q.t);
      let step = byStep.get(t);
      if (!step) byStep.set(t, (step = new Map()));
      step.set(k, o);
    }
  }

  // Each hour: the array (members near a centre), then the plane fit where three or more remain.
  const leftOut = new Map<number, number>(); // member → furthest it was from an hour's centre, km
  const usedAt = new Map<number, { lat: number; east: number; north: number; n: number }>();
  const fits: { t: number; used: number; res: ReturnType<typeof arrayDiagnostics> }[] = [];
  for (const t of [...byStep.keys()].sort((a, b) => a - b)) {
    const at = [...byStep.get(t)!.entries()].map(([k, o]) => ({ k, ...o }));
    if (at.length < 3) continue;
    const { inputs, leftOut: out } = arrayMembers(at);
    for (const x of out) leftOut.set(x.input.k, Math.max(leftOut.get(x.input.k) ?? 0, x.km));
    if (inputs.length < 3) continue;
    const res = arrayDiagnostics({ lat: inputs.map((i) => i.latitude), lon: inputs.map((i) => i.longitude), taux: inputs.map((i) => i.x), tauy: inputs.map((i) => i.y) });
    fits.push({ t, used: res.used, res });
    for (const i of inputs) {
      const u = usedAt.get(i.k) ?? { lat: 0, east: 0, north: 0, n: 0 };
      const lam = i.longitude * DEG;
      usedAt.set(i.k, { lat: u.lat + i.latitude, east: u.east + Math.sin(lam), north: u.north + Math.cos(lam), n: u.n + 1 });
    }
  }
  const name = (k: number) => (members[k]!.platform ? `${members[k]!.title}, drifter ${members[k]!.platform}` : members[k]!.title);
  const never = [...leftOut.keys()].filter((k) => !usedAt.has(k));
  let note: string | null = never.length
    ? `Left out, more than ${ARRAY_MAX_RADIUS_KM} km from the array's centre: ${never.map((k) => `${name(k)} (${Math.round(leftOut.get(k)!).toLocaleString("en-GB")} km)`).join("; ")}.`
    : null;
  const more = (x: string) => (note = note ? `${note} ${x}` : x);
  if (members.length < 3)
    more(
      `Array diagnostics need three or more moorings or drifters with wind stress within ${ARRAY_MAX_RADIUS_KM} km of each other; this project has ${members.length} with a built version and wind stress.`,
    );
  else if (!fits.length) more("The platforms' records do not overlap in time and place (no hour with stress from three or more of them close together).");
  const t0 = fits.length ? fits[0]!.t : 0;
  const len = fits.length ? (fits[fits.length - 1]!.t - t0) / ARRAY_STEP_S + 1 : 0;
  const curl = new Array<number>(len).fill(NaN);
  const pumping = new Array<number>(len).fill(NaN);
  const sverdrup = new Array<number>(len).fill(NaN);
  const used = new Array<number>(len).fill(0);
  let stepNote = false;
  for (const { t, used: n, res } of fits) {
    const j = (t - t0) / ARRAY_STEP_S;
    used[j] = n;
    if (res.ok) {
      curl[j] = res.curl;
      pumping[j] = res.ekmanPumping;
      sverdrup[j] = res.sverdrup;
    } else if (!stepNote) {
      stepNote = true;
      more(`Some steps were not computed: ${res.reason}.`);
    }
  }
  // The members that took part, at their mean position over the hours they did.
  const inputs = [...usedAt.entries()].map(([k, u]) => ({ ...members[k]!, latitude: u.lat / u.n, longitude: Math.atan2(u.east, u.north) / DEG }));
  await pool.query(
    `insert into array_diagnostic_series (project_id, computed_at, inputs, step_s, t0, curl, ekman_pumping, sverdrup, used, note)
     values ($1, now(), $2, $3, $4, $5, $6, $7, $8, $9)
     on conflict (project_id) do update set computed_at = now(), inputs = excluded.inputs, step_s = excluded.step_s, t0 = excluded.t0,
       curl = excluded.curl, ekman_pumping = excluded.ekman_pumping, sverdrup = excluded.sverdrup, used = excluded.used, note = excluded.note`,
    [projectId, JSON.stringify(inputs), ARRAY_STEP_S, t0, curl, pumping, sverdrup, used, note],
  );
  return { steps: fits.length, note };
}

export const arrayDiagnosticsJob: JobDefinition = {
  name: ARRAY_DIAGNOSTICS,
  async register(boss) {
    return boss.work<{ projectId: string }>(ARRAY_DIAGNOSTICS, { pollingIntervalSeconds: 1, batchSize: 1 }, async ([job]) => {
      const { projectId } = payloadSchema.parse(job!.data);
      logger.info({ projectId }, `[${ARRAY_DIAGNOSTICS}][${job!.id}] start`);
      const r = await computeArrayDiagnostics(projectId);
      logger.info({ projectId, ...r }, `[${ARRAY_DIAGNOSTICS}][${job!.id}] finish`);
      return r;
    });
  },
};
