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
 * Array diagnostics for a project's moorings: at each common hourly step where three or more moorings have a wind
 * stress, the engine's least-squares plane fit gives wind-stress curl, Ekman pumping and Sverdrup transport
 * (shared/compute/array.ts, DOMAIN §9). Inputs are each mooring's latest built version (hourly mean of the stress
 * values flagged pass or not evaluated) at the deployment's nominal position.
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

export function enqueueArrayDiagnostics(projectId: string) {
  return enqueue(ARRAY_DIAGNOSTICS, { projectId }, { retryLimit: 3, retryDelay: 5 });
}

interface Input {
  datasetId: string;
  versionId: string;
  versionNumber: number;
  title: string;
  latitude: number;
  longitude: number;
}

/**
 * The array's moorings: the centre is the mooring with the most others within ARRAY_MAX_RADIUS_KM (ties: the
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

/** Computes and stores the project's array series (idempotent: replaces the previous result). */
export async function computeArrayDiagnostics(projectId: string): Promise<{ steps: number; note: string | null }> {
  const { rows } = await pool.query(
    `select distinct on (d.id) d.id as dataset_id, d.title, v.id as version_id, v.number, dp.latitude, dp.longitude
       from datasets d
       join deployments dp on dp.id = d.deployment_id
       join platforms p on p.id = dp.platform_id and p.kind = 'mooring'
       join versions v on v.dataset_id = d.id and v.state = any($2::version_state[])
      where d.project_id = $1 and dp.latitude is not null and dp.longitude is not null
      order by d.id, v.number desc`,
    [projectId, builtVersionStates],
  );
  const all: Input[] = rows.map((r) => ({ datasetId: r.dataset_id, versionId: r.version_id, versionNumber: r.number, title: r.title, latitude: r.latitude, longitude: r.longitude }));
  const { inputs, leftOut } = arrayMembers(all);
  // hour → per input [taux, tauy]
  const byStep = new Map<number, (readonly [number, number] | undefined)[]>();
  for (const [k, inp] of inputs.entries()) {
    // Hourly mean stress over values flagged pass or not evaluated, read from the version's records.
    const s = await pool.query(
      `select floor(extract(epoch from time) / $3)::float8 * $3 as t,
              avg(surface_downward_eastward_stress) filter (where ${flagSql("surface_downward_eastward_stress")} in (1, 2) and surface_downward_eastward_stress <> 'NaN') as x,
              avg(surface_downward_northward_stress) filter (where ${flagSql("surface_downward_northward_stress")} in (1, 2) and surface_downward_northward_stress <> 'NaN') as y
         from records
        where dataset_id = $1 and platform = '' and valid_from <= $2 and (valid_to is null or valid_to > $2)
        group by 1`,
      [inp.datasetId, inp.versionNumber, ARRAY_STEP_S],
    );
    for (const r of s.rows) {
      const x = r.x === null ? NaN : Number(r.x);
      const y = r.y === null ? NaN : Number(r.y);
      if (!Number.isFinite(x) || !Number.isFinite(y)) continue;
      const t = Number(r.t);
      let row = byStep.get(t);
      if (!row) byStep.set(t, (row = new Array(inputs.length).fill(undefined)));
      row[k] = [x, y];
    }
  }
  const steps = [...byStep.entries()].filter(([, r]) => r.filter(Boolean).length >= 3).sort((a, b) => a[0] - b[0]);
  let note: string | null = leftOut.length
    ? `Left out, more than ${ARRAY_MAX_RADIUS_KM} km from the array's centre mooring: ${leftOut.map((x) => `${x.input.title} (${Math.round(x.km).toLocaleString("en-GB")} km)`).join("; ")}.`
    : null;
  const more = (s: string) => (note = note ? `${note} ${s}` : s);
  if (inputs.length < 3)
    more(`Array diagnostics need three or more moorings within ${ARRAY_MAX_RADIUS_KM} km of each other, with a position and a built version; this project has ${inputs.length}.`);
  else if (!steps.length) more("The moorings' records do not overlap in time (no hour with stress from three or more moorings).");
  let stepNote = false;
  const t0 = steps.length ? steps[0]![0] : 0;
  const len = steps.length ? (steps[steps.length - 1]![0] - t0) / ARRAY_STEP_S + 1 : 0;
  const curl = new Array<number>(len).fill(NaN);
  const pumping = new Array<number>(len).fill(NaN);
  const sverdrup = new Array<number>(len).fill(NaN);
  const used = new Array<number>(len).fill(0);
  for (const [t, r] of steps) {
    const idx = r.map((x, i) => (x ? i : -1)).filter((i) => i >= 0);
    const res = arrayDiagnostics({
      lat: idx.map((i) => inputs[i]!.latitude),
      lon: idx.map((i) => inputs[i]!.longitude),
      taux: idx.map((i) => r[i]![0]),
      tauy: idx.map((i) => r[i]![1]),
    });
    const j = (t - t0) / ARRAY_STEP_S;
    used[j] = res.used;
    if (res.ok) {
      curl[j] = res.curl;
      pumping[j] = res.ekmanPumping;
      sverdrup[j] = res.sverdrup;
    } else if (!stepNote) {
      stepNote = true;
      more(`Some steps were not computed: ${res.reason}.`);
    }
  }
  await pool.query(
    `insert into array_diagnostic_series (project_id, computed_at, inputs, step_s, t0, curl, ekman_pumping, sverdrup, used, note)
     values ($1, now(), $2, $3, $4, $5, $6, $7, $8, $9)
     on conflict (project_id) do update set computed_at = now(), inputs = excluded.inputs, step_s = excluded.step_s, t0 = excluded.t0,
       curl = excluded.curl, ekman_pumping = excluded.ekman_pumping, sverdrup = excluded.sverdrup, used = excluded.used, note = excluded.note`,
    [projectId, JSON.stringify(inputs), ARRAY_STEP_S, t0, curl, pumping, sverdrup, used, note],
  );
  return { steps: steps.length, note };
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
