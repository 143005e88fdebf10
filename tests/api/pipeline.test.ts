import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { versionDetailSchema, versionProgressSchema, type ArrayDiagnostics } from "@shared/schemas/versions";
import { pool } from "../../server/db/client";
import { stopSender } from "../../server/jobs/queue";
import { as, makeProjectWithRoles } from "../helpers/api";
import { countRows, makeMooringDataset, mooringMap, mooringText, startWorker, storeUpload, versionRows, waitForVersion, type WorkerHandle } from "../helpers/pipeline";
import { flagSql, setFlagsSql } from "../../server/db/record-flags";
import { readF4, readI4 } from "../../server/db/plot-arrays";
import { randomUUID } from "node:crypto";
import { datasets, deployments, platforms } from "../../server/db/schema";
import { db } from "../../server/db/client";
import { demoFleetColumnMap } from "@shared/demo/generate";

/**
 * The processing pipeline end to end with a real worker process: builds, appends, the seam, determinism, cancel,
 * failures that leave nothing behind, and the released-records trigger (raw SQL).
 */
let worker: WorkerHandle;
let roles: Awaited<ReturnType<typeof makeProjectWithRoles>>;
beforeAll(async () => {
  roles = await makeProjectWithRoles();
  worker = await startWorker();
});
afterAll(async () => {
  if (process.env.PIPELINE_WORKER_LOG) (await import("node:fs")).writeFileSync(process.env.PIPELINE_WORKER_LOG, worker?.output() ?? "");
  await worker?.stop();
  await stopSender();
});

const day = Date.UTC(2026, 9, 1) / 1000;
const iso = (t: number) => new Date(t * 1000).toISOString().replace(".000Z", "Z");
const ALL = ["wind_speed", "wind_speed_qc", "wind_from_direction_qc", "air_temperature", "air_temperature_qc", "surface_downward_eastward_stress", "surface_downward_eastward_stress_qc"];

async function build(datasetId: string, text: string, mode: "replace" | "append", extra: object = {}) {
  const { contributor } = roles.users;
  const uploadId = await storeUpload(datasetId, contributor.id, text);
  const res = await as(contributor.cookie).post(`/api/datasets/${datasetId}/versions`).send({ uploadId, columnMap: mooringMap(), mode, ...extra });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  const v = await waitForVersion(res.body.id, ["ready", "failed"]);
  const detail = versionDetailSchema.parse((await as(contributor.cookie).get(`/api/versions/${res.body.id}`)).body);
  return { id: res.body.id as string, number: res.body.number as number, state: v.state, detail };
}

/** Tables holding a dataset's records (one partition per version that wrote rows), by version, with their row counts. */
async function partitions(datasetId: string): Promise<Record<string, number>> {
  const prefix = `records_${datasetId.replace(/-/g, "")}_`;
  const tables = await pool.query<{ t: string }>(`select relname as t from pg_class where relkind = 'r' and starts_with(relname, $1)`, [prefix]);
  const counts = await pool.query<{ t: string; n: number }>(`select tableoid::regclass::text as t, count(*)::int as n from records where dataset_id = $1 group by 1`, [datasetId]);
  const n = new Map(counts.rows.map((r) => [r.t, r.n]));
  return Object.fromEntries(tables.rows.map((r) => [`v${r.t.slice(prefix.length)}`, n.get(r.t) ?? 0]));
}

/** A gentle wind series at `dt` s with an optional spike (m s-1 added) at given times; other columns steady. */
function windText(start: number, n: number, dt: number, spikes: Record<number, number> = {}) {
  let s = "time,wspd,wdir,gust,airt,baro,rh,sst,cur_e,cur_n\n";
  for (let i = 0; i < n; i++) {
    const t = start + i * dt;
    const w = 6 + 2 * Math.sin(t / 5000) + (spikes[t] ?? 0);
    s += `${iso(t)},${w.toFixed(2)},${(200 + 20 * Math.sin(t / 7000)).toFixed(1)},${(w * 1.3).toFixed(2)},${(15 + Math.sin(t / 9000)).toFixed(2)},${(1013 + Math.sin(t / 11000)).toFixed(2)},${(75 + 5 * Math.sin(t / 8000)).toFixed(1)},${(17 + 0.2 * Math.sin(t / 13000)).toFixed(3)},${(10 * Math.sin(t / 6000)).toFixed(2)},${(5 * Math.cos(t / 6000)).toFixed(2)}\n`;
  }
  return s;
}

describe("POST /api/datasets/:id/versions", () => {
  test("builds a version from an upload: records in canonical units, summary and plot buckets", async () => {
    const { datasetId } = await makeMooringDataset(roles.projectId);
    const v = await build(datasetId, mooringText({ start: day, durationS: 86400, intervalS: 60 }), "replace");
    expect(v.state, JSON.stringify(v.detail.progress?.error)).toBe("ready");
    expect(v.detail.summary!.rows).toBe(1440);
    expect(v.detail.summary!.coverage).toBe(1);
    expect(v.detail.progress!.percent).toBe(100);
    expect(v.detail.qcRun!.rowsWritten).toBe(1440);
    expect(await countRows(datasetId)).toBe(1440);
    const rows = await versionRows(datasetId, 1, ["wind_speed", "air_temperature"]);
    expect(rows[0]!.t).toBe(day);
    // degC in the file → K in records (canonical unit, shared/vocabulary.ts).
    expect(Number(rows[0]!.air_temperature)).toBeGreaterThan(270);
    // Bucket arrays are bytea of big-endian elements, 4 bytes a count (server/db/plot-arrays.ts).
    const series = await pool.query(`select platform, step_s, length(n) / 4 as len, t0 from plot_series where version_id = $1 and variable = 'wind_speed' order by step_s`, [v.id]);
    const len = (step: number) => series.rows.find((r) => r.step_s === step)?.len;
    expect(len(60)).toBe(1440);
    expect(len(3600)).toBe(24);
    // The first hour's bucket agrees with the records it summarises (stored as float4).
    const hour = (await pool.query(`select min, max, n from plot_series where version_id = $1 and variable = 'wind_speed' and step_s = 3600`, [v.id])).rows[0];
    const raw = await pool.query(`select min(wind_speed) as lo, max(wind_speed) as hi, count(*)::int as n from records where dataset_id = $1 and time < to_timestamp($2)`, [datasetId, day + 3600]);
    expect(readI4(hour.n)[0]).toBe(60);
    expect(readF4(hour.min)[0]).toBeCloseTo(raw.rows[0].lo, 5);
    expect(readF4(hour.max)[0]).toBeCloseTo(raw.rows[0].hi, 5);
  });

  test("refuses an upload of another dataset (forged id) and an append with nothing to append to", async () => {
    const { contributor } = roles.users;
    const a = await makeMooringDataset(roles.projectId);
    const b = await makeMooringDataset(roles.projectId);
    const foreign = await storeUpload(b.datasetId, contributor.id, windText(day, 10, 60));
    const res = await as(contributor.cookie).post(`/api/datasets/${a.datasetId}/versions`).send({ uploadId: foreign, columnMap: mooringMap(), mode: "replace" });
    expect(res.status).toBe(404);
    const own = await storeUpload(a.datasetId, contributor.id, windText(day, 10, 60));
    const app = await as(contributor.cookie).post(`/api/datasets/${a.datasetId}/versions`).send({ uploadId: own, columnMap: mooringMap(), mode: "append" });
    expect(app.status).toBe(409);
    expect(app.body.error.message).toMatch(/replace/);
    const bad = await as(contributor.cookie).post(`/api/datasets/${a.datasetId}/versions`).send({ uploadId: own, columnMap: mooringMap(), mode: "replace", qcSettings: { timing: { gapFactor: 0.1 } } });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields ?? bad.body.error.details ?? {})).toContain("qcSettings.timing.gapFactor");
    expect(await countRows(a.datasetId)).toBe(0);
  });

  test("re-running a build with the same inputs and settings gives identical flags and values", async () => {
    const text = windText(day, 3000, 60, { [day + 600 * 60]: 25 });
    const a = await makeMooringDataset(roles.projectId);
    const b = await makeMooringDataset(roles.projectId);
    await build(a.datasetId, text, "replace");
    await build(b.datasetId, text, "replace");
    const ra = await versionRows(a.datasetId, 1, ALL);
    const rb = await versionRows(b.datasetId, 1, ALL);
    expect(ra.length).toBe(3000);
    expect(rb).toEqual(ra);
    expect(ra.find((r) => r.t === day + 600 * 60)!.wind_speed_qc).toBe(4);
  });

  test("append: the upload wins where times overlap, replaced rows are counted, the base version is unchanged", async () => {
    const { datasetId } = await makeMooringDataset(roles.projectId);
    const v1 = await build(datasetId, windText(day, 2000, 60), "replace");
    const before = await versionRows(datasetId, 1, ALL);
    // The new upload starts 500 records before v1 ends, with other wind values.
    const start2 = day + 1500 * 60;
    const text2 = windText(start2, 1000, 60).replace(/^(\S+?),(\d+\.\d+),/gm, (_m, t, w) => (t === "time" ? _m : `${t},${(Number(w) + 1).toFixed(2)},`));
    const v2 = await build(datasetId, text2, "append");
    expect(v2.state, JSON.stringify(v2.detail.progress?.error)).toBe("ready");
    expect(v2.detail.baseVersionNumber).toBe(v1.number);
    expect(v2.detail.qcRun!.rowsReplaced).toBe(500);
    expect(v2.detail.summary!.rows).toBe(2500);
    const after = await versionRows(datasetId, 2, ALL);
    expect(after.length).toBe(2500);
    const at = (rows: typeof after, t: number) => rows.find((r) => r.t === t)!;
    expect(Number(at(after, start2 + 60).wind_speed)).toBeCloseTo(Number(at(before, start2 + 60).wind_speed) + 1, 2);
    // Version 1 still sees exactly what it saw.
    expect(await versionRows(datasetId, 1, ALL)).toEqual(before);
    // Storage grows with the change: 2000 + 1000 new + the re-evaluated seam record, each version's own rows in the
    // partition its build made.
    expect(await countRows(datasetId)).toBe(3001);
    expect(await partitions(datasetId)).toEqual({ v1: 2000, v2: 1001 });
  });

  test("the seam: a spike on the last record of one month is caught when the next month is appended", async () => {
    const { datasetId } = await makeMooringDataset(roles.projectId);
    const n1 = 1440;
    const last = day + (n1 - 1) * 60;
    await build(datasetId, windText(day, n1, 60, { [last]: 20 }), "replace");
    const v1 = await versionRows(datasetId, 1, ["wind_speed_qc"]);
    // At the end of a series the spike test cannot judge the last value (it needs the next one).
    expect(v1.find((r) => r.t === last)!.wind_speed_qc).not.toBe(4);
    // Next month also starts with a spike on its first record.
    const first2 = last + 60;
    const v2 = await build(datasetId, windText(first2, n1, 60, { [first2 + 600]: 20 }), "append");
    expect(v2.state).toBe("ready");
    const rows = await versionRows(datasetId, 2, ["wind_speed_qc"]);
    expect(rows.length).toBe(2 * n1);
    expect(rows.find((r) => r.t === last)!.wind_speed_qc).toBe(4);
    expect(rows.find((r) => r.t === first2 + 600)!.wind_speed_qc).toBe(4);
    // The neighbour after the seam is not taken for a spike (rate of change may call the step back suspect).
    expect(rows.find((r) => r.t === first2)!.wind_speed_qc).not.toBe(4);
  });

  test("a column map naming a column the file lacks is refused before any version is made", async () => {
    const { datasetId } = await makeMooringDataset(roles.projectId);
    const { contributor } = roles.users;
    const uploadId = await storeUpload(datasetId, contributor.id, windText(day, 50, 60).replace("wspd", "wind_ms"));
    const res = await as(contributor.cookie).post(`/api/datasets/${datasetId}/versions`).send({ uploadId, columnMap: mooringMap(), mode: "replace" });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/Column "wspd".*not in the header on line 1/);
    expect(res.body.error.details.columnMap[0]).toMatch(/Column "wspd"/);
    const versions = await pool.query(`select count(*)::int as n from versions where dataset_id = $1`, [datasetId]);
    expect(versions.rows[0]).toEqual({ n: 0 });
    expect(await countRows(datasetId)).toBe(0);
  });

  test("a failed build names the problem and leaves no records behind", async () => {
    // Every line without a readable time: failed, with the first problem's line and column.
    const { datasetId: d2 } = await makeMooringDataset(roles.projectId);
    const v2 = await build(d2, "time,wspd,wdir,gust,airt,baro,rh,sst,cur_e,cur_n\nyesterday,1,2,3,4,1000,6,7,8,9\n", "replace");
    expect(v2.state).toBe("failed");
    expect(v2.detail.progress!.error).toMatchObject({ line: 2, column: "time" });
    expect(await countRows(d2)).toBe(0);
    expect(await partitions(d2)).toEqual({});
  });

  test("cancel stops a running build, keeps nothing, and retry builds it", async () => {
    const { contributor } = roles.users;
    const { datasetId } = await makeMooringDataset(roles.projectId);
    // Eight days at 1 Hz: long enough that the cancel lands while the build is still running, even on a quiet machine
    // (four days took ~1.5 s once builds wrote their own partitions, about one progress tick after the cancel).
    const durationS = 8 * 86400;
    const uploadId = await storeUpload(datasetId, contributor.id, mooringText({ start: day, durationS, intervalS: 1 }));
    const res = await as(contributor.cookie).post(`/api/datasets/${datasetId}/versions`).send({ uploadId, columnMap: mooringMap(), mode: "replace" });
    expect(res.status).toBe(201);
    const id = res.body.id as string;
    const until = Date.now() + 30_000;
    for (;;) {
      const p = versionProgressSchema.parse((await as(contributor.cookie).get(`/api/versions/${id}/progress`)).body);
      if (p.runState === "running" && p.rowsDone > 0) break;
      if (Date.now() > until || p.versionState !== "processing") throw new Error(`build did not start running: ${JSON.stringify(p)}`);
      await new Promise((r) => setTimeout(r, 50));
    }
    const c = await as(contributor.cookie).post(`/api/versions/${id}/cancel`).send({});
    expect(c.status).toBe(200);
    await waitForVersion(id, ["failed", "ready"]);
    const p = versionProgressSchema.parse((await as(contributor.cookie).get(`/api/versions/${id}/progress`)).body);
    expect(p).toMatchObject({ versionState: "failed", runState: "cancelled" });
    expect(await countRows(datasetId)).toBe(0);
    expect(await partitions(datasetId)).toEqual({});
    expect((await as(contributor.cookie).post(`/api/versions/${id}/cancel`).send({})).status).toBe(409);
    const r = await as(contributor.cookie).post(`/api/versions/${id}/retry`).send({});
    expect(r.status).toBe(200);
    expect(r.body.versionState).toBe("processing");
    expect((await waitForVersion(id, ["ready", "failed"], 120_000)).state).toBe("ready");
    expect(await countRows(datasetId)).toBe(durationS);
    expect(await partitions(datasetId)).toEqual({ v1: durationS });
  }, 240_000);
});

describe("GET /api/projects/:id/array-diagnostics", () => {
  test("three overlapping moorings give hourly curl, Ekman pumping and Sverdrup transport", async () => {
    const { projectId } = await (async () => ({ projectId: (await makeProjectWithRoles()).projectId }))();
    const { contributor } = roles.users;
    await pool.query(`insert into memberships (project_id, user_id, role) values ($1, $2, 'contributor')`, [projectId, contributor.id]);
    // A triangle of moorings ~20 km apart feeling the same wind: a uniform stress field.
    const sites = [
      { latitude: 41.2, longitude: -27.6 },
      { latitude: 41.35, longitude: -27.45 },
      { latitude: 41.15, longitude: -27.3 },
    ];
    const text = windText(day, 600, 60);
    for (const site of sites) {
      const { datasetId } = await makeMooringDataset(projectId, site);
      const uploadId = await storeUpload(datasetId, contributor.id, text);
      const r = await as(contributor.cookie).post(`/api/datasets/${datasetId}/versions`).send({ uploadId, columnMap: mooringMap(), mode: "replace" });
      await waitForVersion(r.body.id, ["ready"]);
    }
    let body: ArrayDiagnostics | undefined;
    const until = Date.now() + 60_000;
    while (Date.now() < until) {
      const res = await as(contributor.cookie).get(`/api/projects/${projectId}/array-diagnostics`);
      expect(res.status).toBe(200);
      body = res.body;
      if (body!.inputs.length === 3 && body!.time.length === 10) break;
      await new Promise((r) => setTimeout(r, 250));
    }
    expect(body!.inputs.length).toBe(3);
    expect(body!.time.length).toBe(10); // 600 minutes = 10 whole hours
    expect(body!.caution).toMatch(/not for navigation/);
    // Uniform stress: the plane fit has no gradient, so curl and Sverdrup transport vanish and the pumping is the β term
    // alone, w = β τx / (ρ f²) with f = 2Ω sin φ and β = 2Ω cos φ / a (Gill 1982, Atmosphere–Ocean Dynamics §9.4 and
    // §12.2 — formulas from memory; DOMAIN §9; ρ = 1025 kg m-3 common practice).
    const taux = await pool.query(
      `select floor(extract(epoch from r.time) / 3600) as h, avg(surface_downward_eastward_stress) filter (where ${flagSql("surface_downward_eastward_stress", "r.")} in (1, 2)) as x from records r
         join datasets d on d.id = r.dataset_id where d.project_id = $1 group by 1 order by 1 limit 1`,
      [projectId],
    );
    const phi = (sites.reduce((s, x) => s + x.latitude, 0) / 3) * (Math.PI / 180);
    const omega = 7.2921e-5;
    const f = 2 * omega * Math.sin(phi);
    const beta = (2 * omega * Math.cos(phi)) / 6.371e6;
    expect(Math.abs(body!.curl[0]!)).toBeLessThan(1e-15);
    expect(Math.abs(body!.sverdrup[0]!)).toBeLessThan(1e-6);
    const expected = (beta * Number(taux.rows[0].x)) / (1025 * f * f);
    expect(Math.abs(expected)).toBeGreaterThan(1e-12);
    expect(Math.abs(body!.ekmanPumping[0]! / expected - 1)).toBeLessThan(1e-3);
    expect(body!.used[0]).toBe(3);

    // The same series as CSV from the versioned API, for scripts: one line per step, the numbers as JSON has them.
    const csv = await as(contributor.cookie).get(`/api/v1/projects/${projectId}/array-diagnostics?format=csv`);
    expect(csv.status).toBe(200);
    expect(csv.headers["content-type"]).toMatch(/^text\/csv/);
    expect(csv.headers["content-disposition"]).toMatch(/^attachment; filename="array-diagnostics-2026-10-01-to-2026-10-01\.csv"$/);
    const lines = csv.text.trim().split("\n");
    expect(lines[0]).toBe("time_utc,platforms_used,wind_stress_curl_N_m-3,ekman_pumping_upward_m_s-1,sverdrup_transport_m2_s-1");
    expect(lines.slice(1).map((l) => l.split(","))).toEqual(
      body!.time.map((t, i) => [new Date(t * 1000).toISOString(), String(body!.used[i]), String(body!.curl[i]), String(body!.ekmanPumping[i]), String(body!.sverdrup[i])]),
    );
    const bad = await as(contributor.cookie).get(`/api/v1/projects/${projectId}/array-diagnostics?format=xlsx`);
    expect(bad.status).toBe(400);
    expect(JSON.stringify(bad.body)).toMatch(/format must be json or csv/);

    // A fourth mooring an ocean away (invented, off another coast) is no part of this array: it is left out and
    // named, and the array's series stay as they were (a plane fit across a basin is not a local curl).
    const far = await makeMooringDataset(projectId, { latitude: 41.3, longitude: -124.8 });
    const farUpload = await storeUpload(far.datasetId, contributor.id, text);
    const farVersion = await as(contributor.cookie).post(`/api/datasets/${far.datasetId}/versions`).send({ uploadId: farUpload, columnMap: mooringMap(), mode: "replace" });
    await waitForVersion(farVersion.body.id, ["ready"]);
    let after: ArrayDiagnostics | undefined;
    const until2 = Date.now() + 60_000;
    while (Date.now() < until2) {
      after = (await as(contributor.cookie).get(`/api/projects/${projectId}/array-diagnostics`)).body;
      if (after!.note?.includes("Left out")) break;
      await new Promise((r) => setTimeout(r, 250));
    }
    expect(after!.note).toMatch(/^Left out, more than 500 km from the array's centre: .+ \(\d[\d,]* km\)\.$/);
    expect(after!.inputs.map((i) => i.datasetId).sort()).toEqual(body!.inputs.map((i) => i.datasetId).sort());
    expect(after!.curl).toEqual(body!.curl);
    expect(after!.ekmanPumping).toEqual(body!.ekmanPumping);
  });
});

describe("array diagnostics of a drifter cluster", () => {
  /** Wraps a longitude into [-180, 180), as a fleet's files write them. */
  const wrapLon = (lon: number) => ((((lon + 180) % 360) + 360) % 360) - 180;

  /**
   * An invented fleet of three drifters, each drifting slowly north-east, under one uniform wind field: builds it
   * in a project of its own and returns the project's array diagnostics once its job has run.
   */
  async function fleetArray(starts: { id: string; lat: number; lon: number }[]) {
    const { projectId } = await makeProjectWithRoles();
    const { contributor } = roles.users;
    await pool.query(`insert into memberships (project_id, user_id, role) values ($1, $2, 'contributor')`, [projectId, contributor.id]);
    const [plat] = await db.insert(platforms).values({ projectId, name: `Merrow fleet ${randomUUID().slice(0, 6)}`, kind: "drifter" }).returning();
    const [dep] = await db.insert(deployments).values({ platformId: plat!.id, name: "Release A", startTime: new Date("2026-01-01T00:00:00Z") }).returning();
    const [ds] = await db.insert(datasets).values({ projectId, deploymentId: dep!.id, title: "Fleet with anemometers" }).returning();
    let text = "time,id,lat,lon,wspd,wdir\n";
    for (let i = 0; i < 60; i++) {
      const t = day + i * 600;
      // The same wind at all three each time (a uniform field), varying in time so the flat-line test passes it.
      const w = (9 + 0.5 * Math.sin(i / 3)).toFixed(2);
      const dir = (250 + 5 * Math.cos(i / 4)).toFixed(1);
      for (const d of starts) text += `${iso(t)},${d.id},${(d.lat + i * 1e-4).toFixed(5)},${wrapLon(d.lon + i * 1e-4).toFixed(5)},${w},${dir}\n`;
    }
    const map = {
      ...demoFleetColumnMap(),
      columns: [
        ...demoFleetColumnMap().columns,
        { column: "wspd", variable: "wind_speed", unit: "m s-1" },
        { column: "wdir", variable: "wind_from_direction", unit: "degree" },
      ],
    };
    const uploadId = await storeUpload(ds!.id, contributor.id, text, "fleet-wind.csv");
    const r = await as(contributor.cookie).post(`/api/datasets/${ds!.id}/versions`).send({ uploadId, columnMap: map, mode: "replace" });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    const built = await waitForVersion(r.body.id, ["ready", "failed"]);
    expect(built.state, JSON.stringify(built)).toBe("ready");
    let body: ArrayDiagnostics | undefined;
    const until = Date.now() + 30_000;
    while (Date.now() < until) {
      body = (await as(contributor.cookie).get(`/api/projects/${projectId}/array-diagnostics`)).body;
      if (body!.time.length === 10) break;
      await new Promise((res) => setTimeout(res, 250));
    }
    return { datasetId: ds!.id, body: body! };
  }

  test("three drifters measuring wind give the array at their hourly positions, like moorings would", async () => {
    // ~20 km apart.
    const starts = [
      { id: "TW-01", lat: 41.2, lon: -27.6 },
      { id: "TW-02", lat: 41.35, lon: -27.45 },
      { id: "TW-03", lat: 41.15, lon: -27.3 },
    ];
    const { datasetId, body } = await fleetArray(starts);
    expect(body.time.length).toBe(10);
    expect(body.inputs.map((i) => [i.kind, i.platform]).sort()).toEqual(starts.map((d) => ["drifter", d.id]));
    expect(body.used.every((n) => n === 3)).toBe(true);
    // Uniform stress: no curl, no Sverdrup transport; the pumping is the β term alone, w = β τx / (ρ f²) at the
    // drifters' mean latitude that hour (Gill 1982 §9.4 and §12.2, formulas from memory; DOMAIN §9; ρ = 1025 kg m-3
    // common practice).
    const { rows } = await pool.query(
      `select avg(surface_downward_eastward_stress) as x, avg(latitude) as lat from records
        where dataset_id = $1 and time >= to_timestamp($2) and time < to_timestamp($2 + 3600)`,
      [datasetId, body.time[0]],
    );
    const phi = (Number(rows[0].lat) * Math.PI) / 180;
    const omega = 7.2921e-5;
    const f = 2 * omega * Math.sin(phi);
    const beta = (2 * omega * Math.cos(phi)) / 6.371e6;
    const expected = (beta * Number(rows[0].x)) / (1025 * f * f);
    expect(Math.abs(body.curl[0]!)).toBeLessThan(1e-15);
    expect(Math.abs(body.sverdrup[0]!)).toBeLessThan(1e-6);
    expect(Math.abs(expected)).toBeGreaterThan(1e-12);
    expect(Math.abs(body.ekmanPumping[0]! / expected - 1)).toBeLessThan(1e-3);
    // Positions are each drifter's mean over the hours it took part, not a deployment's.
    const tw1 = body.inputs.find((i) => i.platform === "TW-01")!;
    expect(tw1.latitude).toBeGreaterThan(41.2);
    expect(tw1.latitude).toBeLessThan(41.2 + 60e-4);
    expect(tw1.longitude).toBeGreaterThan(-27.6);
    expect(tw1.longitude).toBeLessThan(-27.6 + 60e-4);
  });

  test("a drifter crossing the date line within an hour stays in the array, at its place by the date line", async () => {
    // The same fleet by the date line: TW-01 crosses it (179.998° E → 179.996° W) in its fourth hour. Averaging its
    // longitudes plainly would put it near 0° that hour, half the world from the others, and leave it out.
    const starts = [
      { id: "TW-01", lat: -41.2, lon: 179.998 },
      { id: "TW-02", lat: -41.05, lon: 180.15 },
      { id: "TW-03", lat: -41.25, lon: 179.8 },
    ];
    const { body } = await fleetArray(starts);
    expect(body.note ?? "").not.toMatch(/Left out/);
    expect(body.time.length).toBe(10);
    expect(body.used.every((n) => n === 3)).toBe(true);
    expect(body.curl.every((c) => c !== null && Math.abs(c) < 1e-15)).toBe(true);
    for (const d of starts) {
      const m = body.inputs.find((i) => i.platform === d.id)!;
      // Within the 0.006° it drifted of where it started, measured across the date line.
      const off = wrapLon(m.longitude - d.lon);
      expect(off, `${d.id} at ${m.longitude}`).toBeGreaterThanOrEqual(0);
      expect(off, `${d.id} at ${m.longitude}`).toBeLessThan(60e-4);
    }
  });
});

describe("records of released versions (database trigger, raw SQL)", () => {
  test("refuses UPDATE and DELETE that would change a released version, allows closing rows after it", async () => {
    const { datasetId } = await makeMooringDataset(roles.projectId);
    const v1 = await build(datasetId, windText(day, 100, 60), "replace");
    // Released the way users release: submit, a curator approves and releases.
    expect((await as(roles.users.contributor.cookie).post(`/api/versions/${v1.id}/submit`).send({})).status).toBe(200);
    expect((await as(roles.users.curator.cookie).post(`/api/versions/${v1.id}/approve`).send({})).status).toBe(200);
    const rel = await as(roles.users.curator.cookie).post(`/api/versions/${v1.id}/release`).send({});
    expect(rel.status, JSON.stringify(rel.body)).toBeLessThan(300);
    const ts = `'${iso(day)}'`;
    await expect(pool.query(`update records set wind_speed = 99 where dataset_id = $1 and time = ${ts}`, [datasetId])).rejects.toThrow(/released version 1/);
    await expect(pool.query(`update records set flags = ${setFlagsSql([{ variable: "wind_speed", value: "4" }])} where dataset_id = $1`, [datasetId])).rejects.toThrow(/released version 1/);
    await expect(pool.query(`delete from records where dataset_id = $1`, [datasetId])).rejects.toThrow(/released version 1/);
    await expect(pool.query(`update records set valid_to = 1 where dataset_id = $1`, [datasetId])).rejects.toThrow();
    await expect(pool.query(`truncate records`)).rejects.toThrow(/truncated/);
    // The same by the name of the version's own partition (SECURITY.md: no UPDATE/DELETE reaches released rows).
    const part = `records_${datasetId.replace(/-/g, "")}_1`;
    await expect(pool.query(`update ${part} set wind_speed = 99 where time = ${ts}`)).rejects.toThrow(/released version 1/);
    await expect(pool.query(`delete from ${part}`)).rejects.toThrow(/released version 1/);
    await expect(pool.query(`truncate ${part}`)).rejects.toThrow(/truncated/);
    await expect(pool.query(`update ${part} set valid_to = 1`)).rejects.toThrow();
    // Closing a row at version 2 does not change what version 1 sees: allowed (that is how version 2 replaces it).
    const ok = await pool.query(`update records set valid_to = 2 where dataset_id = $1 and time = ${ts}`, [datasetId]);
    expect(ok.rowCount).toBe(1);
    // Reopening it would change nothing for version 1 either; moving it into version 1's past would (the row would
    // move to version 2's partition, there as a build of version 2 would have made it).
    await pool.query(`select records_partition($1, 2)`, [datasetId]);
    await expect(pool.query(`update records set valid_from = 2, valid_to = null where dataset_id = $1 and time = ${ts}`, [datasetId])).rejects.toThrow(/released version 1/);
    await expect(pool.query(`delete from datasets where id = $1`, [datasetId])).rejects.toThrow();
    expect(await countRows(datasetId)).toBe(100);
  });
});
