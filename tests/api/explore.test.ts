import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { plotWindowSchema, qcReportSchema, recordsPageSchema, trackSchema, type PlotSeries } from "@shared/schemas/explore";
import { pool } from "../../server/db/client";
import { stopSender } from "../../server/jobs/queue";
import { as, makeProjectWithRoles, testApp } from "../helpers/api";
import { buildMooringVersion, buildVersionFromText, releaseVersion } from "../helpers/explore";
import { demoMooringColumnMap } from "@shared/demo/generate";
import { makeMooringDataset, versionRows } from "../helpers/pipeline";
import { flagSql } from "../../server/db/record-flags";

let roles: Awaited<ReturnType<typeof makeProjectWithRoles>>;
let datasetId: string;
let version: { id: string; number: number };
const day = Date.UTC(2026, 9, 1) / 1000;

beforeAll(async () => {
  testApp();
  roles = await makeProjectWithRoles();
  ({ datasetId } = await makeMooringDataset(roles.projectId));
  // One day at 10 s: 8,640 records, enough for several records per bucket at every zoom.
  version = await buildMooringVersion(datasetId, roles.users.contributor, { start: day, durationS: 86400, intervalS: 10 });
});
afterAll(async () => {
  await stopSender();
});

/** Bucket [t, t + step) min, max, count and worst flag of the raw rows, computed here in plain JS. */
function rawBuckets(rows: Record<string, number | string | null>[], variable: string, t: number, step: number) {
  let min = Infinity;
  let max = -Infinity;
  let n = 0;
  let worst = 0;
  for (const r of rows) {
    const rt = Number(r.t);
    if (rt < t || rt >= t + step) continue;
    const x = r[variable] === null ? NaN : Number(r[variable]);
    if (Number.isNaN(x)) continue;
    n++;
    if (x < min) min = x;
    if (x > max) max = x;
    const f = Number(r[`${variable}_qc`]);
    if (f !== 9 && f > worst) worst = f;
  }
  return { min, max, n, worst: worst || 9 };
}

async function checkWindow(query: string, expectSource: "series" | "records") {
  const res = await as(roles.users.contributor.cookie).get(`/api/versions/${version.id}/plot?${query}`);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  const w = plotWindowSchema.parse(res.body);
  expect(w.source).toBe(expectSource);
  const vars = ["wind_speed", "air_temperature", "magnitude_of_surface_downward_stress"];
  const rows = await versionRows(datasetId, version.number, vars.flatMap((v) => [v, `${v}_qc`]));
  const from = Date.parse(w.from) / 1000;
  const to = Date.parse(w.to) / 1000;
  const inWindow = rows.filter((r) => Number(r.t) >= from && Number(r.t) < to);
  for (const v of vars) {
    const s = w.series.find((x: PlotSeries) => x.variable === v);
    expect(s, v).toBeDefined();
    // Every non-empty bucket of the window is returned, and no other.
    const expectedBuckets = new Set(inWindow.map((r) => Math.floor(Number(r.t) / w.stepS) * w.stepS));
    expect(s!.t.length).toBe(expectedBuckets.size);
    s!.t.forEach((t, i) => {
      const raw = rawBuckets(inWindow, v, t, w.stepS);
      // Pre-aggregated series hold float4 values: compare to 7 significant digits there, exactly for records.
      const tol = (x: number) => (expectSource === "series" ? Math.abs(x) * 1e-6 + 1e-30 : 0);
      expect(Math.abs(s!.min[i]! - raw.min), `${v} min @${t}`).toBeLessThanOrEqual(tol(raw.min));
      expect(Math.abs(s!.max[i]! - raw.max), `${v} max @${t}`).toBeLessThanOrEqual(tol(raw.max));
      expect(s!.n[i], `${v} n @${t}`).toBe(raw.n);
      expect(s!.worstFlag[i], `${v} flag @${t}`).toBe(raw.worst);
    });
  }
  return w;
}

describe("GET /api/versions/:id/plot", () => {
  test("coarse window from the hourly series keeps each bucket's true min and max", async () => {
    const w = await checkWindow(`variables=wind_speed,air_temperature,magnitude_of_surface_downward_stress&buckets=10`, "series");
    expect(w.stepS % 3600).toBe(0);
  });

  test("middle window from the minute series keeps each bucket's true min and max", async () => {
    const w = await checkWindow(
      `variables=wind_speed,air_temperature,magnitude_of_surface_downward_stress&from=2026-10-01T03:17:00Z&to=2026-10-01T20:41:30Z&buckets=300`,
      "series",
    );
    expect(w.stepS % 60).toBe(0);
  });

  test("the 15-minute level folded from minutes keeps each bucket's true min and max", async () => {
    const w = await checkWindow(`variables=wind_speed,air_temperature,magnitude_of_surface_downward_stress&buckets=100`, "series");
    expect(w.stepS).toBe(900);
  });

  test("fine window groups the records themselves, exactly", async () => {
    const w = await checkWindow(`variables=wind_speed,air_temperature,magnitude_of_surface_downward_stress&from=2026-10-01T06:00:05Z&to=2026-10-01T09:00:00Z&buckets=500`, "records");
    expect(w.stepS).toBeLessThan(60);
    // Several records per bucket, so min and max differ somewhere (the test would be vacuous otherwise).
    const s = w.series.find((x) => x.variable === "wind_speed")!;
    expect(s.n.some((n) => n > 1)).toBe(true);
    expect(s.min.some((m, i) => m < s.max[i]!)).toBe(true);
  });

  test("bad requests name the field", async () => {
    const c = as(roles.users.contributor.cookie);
    const unknown = await c.get(`/api/versions/${version.id}/plot?variables=wind_speed,latitude`);
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.details.variables[0]).toMatch(/latitude/);
    const order = await c.get(`/api/versions/${version.id}/plot?variables=wind_speed&from=2026-10-02T00:00:00Z&to=2026-10-01T00:00:00Z`);
    expect(order.status).toBe(400);
    expect(order.body.error.details.to).toBeDefined();
    const time = await c.get(`/api/versions/${version.id}/plot?variables=wind_speed&from=yesterday`);
    expect(time.status).toBe(400);
    expect(time.body.error.details.from).toBeDefined();
  });
});

describe("GET /api/versions/:id/records", () => {
  test("keyset pages walk every record once, in order, with flags beside values", async () => {
    const c = as(roles.users.contributor.cookie);
    const seen: string[] = [];
    let cursor: string | null = null;
    do {
      const res = await c.get(`/api/versions/${version.id}/records?variables=wind_speed&limit=2000${cursor ? `&cursor=${cursor}` : ""}`);
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      const page = recordsPageSchema.parse(res.body);
      expect(page.columns[0]).toMatchObject({ key: "wind_speed", unit: "m s-1" });
      for (const r of page.items) {
        seen.push(r.time);
        expect([1, 2, 3, 4, 9]).toContain(r.flags.wind_speed);
      }
      cursor = page.nextCursor;
    } while (cursor);
    expect(seen.length).toBe(8640);
    expect(new Set(seen).size).toBe(8640);
    expect([...seen].sort()).toEqual(seen);
  });

  test("descending order, time range and flag filters", async () => {
    const c = as(roles.users.contributor.cookie);
    const desc = recordsPageSchema.parse((await c.get(`/api/versions/${version.id}/records?variables=wind_speed&order=desc&limit=3`)).body);
    expect(desc.items[0]!.time).toBe("2026-10-01T23:59:50.000Z");
    const range = recordsPageSchema.parse((await c.get(`/api/versions/${version.id}/records?from=2026-10-01T01:00:00Z&to=2026-10-01T01:01:00Z`)).body);
    expect(range.items.map((r) => r.time)).toEqual(Array.from({ length: 7 }, (_, i) => new Date((day + 3600 + 10 * i) * 1000).toISOString()));
    const { rows } = await pool.query(
      `select count(*)::int as n from records where dataset_id = $1 and valid_from <= $2 and (valid_to is null or valid_to > $2) and (${flagSql("wind_speed")} in (3, 4) or ${flagSql("air_temperature")} in (3, 4))`,
      [datasetId, version.number],
    );
    const flagged = recordsPageSchema.parse((await c.get(`/api/versions/${version.id}/records?variables=wind_speed,air_temperature&flags=3,4&limit=2000`)).body);
    expect(flagged.items.length).toBe(rows[0].n);
    for (const r of flagged.items) expect([r.flags.wind_speed, r.flags.air_temperature].some((f) => f === 3 || f === 4)).toBe(true);
    const bad = await c.get(`/api/versions/${version.id}/records?cursor=nonsense`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.cursor).toBeDefined();
  });
});

describe("GET /api/versions/:id/records sorted by a variable", () => {
  test("keyset pages walk the records by value, largest first, ties by time", async () => {
    const c = as(roles.users.contributor.cookie);
    // The expectation, independently: every record of the version read in time order, then sorted here.
    const all: { time: string; v: number | null }[] = [];
    let cursor: string | null = null;
    do {
      const page = recordsPageSchema.parse((await c.get(`/api/versions/${version.id}/records?variables=wind_speed&limit=2000${cursor ? `&cursor=${cursor}` : ""}`)).body);
      all.push(...page.items.map((r) => ({ time: r.time, v: r.values.wind_speed ?? null })));
      cursor = page.nextCursor;
    } while (cursor);
    const expected = all
      .filter((r) => r.v !== null)
      .sort((a, b) => b.v! - a.v! || (a.time < b.time ? 1 : a.time > b.time ? -1 : 0))
      .map((r) => `${r.time} ${r.v}`);
    // Several records share a value (to the data's 0.01 m/s), so the tie order is tested too.
    expect(new Set(expected.map((x) => x.split(" ")[1])).size).toBeLessThan(expected.length);

    const seen: string[] = [];
    do {
      const res = await c.get(`/api/versions/${version.id}/records?variables=wind_speed,air_temperature&sort=wind_speed&order=desc&limit=700${cursor ? `&cursor=${cursor}` : ""}`);
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      const page = recordsPageSchema.parse(res.body);
      seen.push(...page.items.map((r) => `${r.time} ${r.values.wind_speed}`));
      cursor = page.nextCursor;
    } while (cursor);
    expect(seen).toEqual(expected);

    const asc = recordsPageSchema.parse((await c.get(`/api/versions/${version.id}/records?variables=wind_speed&sort=wind_speed&order=asc&limit=1`)).body);
    expect(`${asc.items[0]!.time} ${asc.items[0]!.values.wind_speed}`).toBe(expected[expected.length - 1]);
  });

  test("records without a value of the sort variable are left out, not sorted as the largest", async () => {
    // PostgreSQL orders NaN above every number; a blank reading must not head a "largest first" list.
    const m = await makeMooringDataset(roles.projectId);
    const lines = ["time,wspd,airt"];
    for (let k = 0; k < 12; k++) lines.push(`2026-10-03T00:${String(k * 5).padStart(2, "0")}:00Z,${k % 4 === 1 ? "" : (5 + k / 10).toFixed(1)},12.5`);
    const map = {
      ...demoMooringColumnMap(),
      columns: [
        { column: "wspd", variable: "wind_speed", unit: "m s-1" },
        { column: "airt", variable: "air_temperature", unit: "degC" },
      ],
    };
    const v = await buildVersionFromText(m.datasetId, roles.users.contributor, `${lines.join("\n")}\n`, { map });
    const page = recordsPageSchema.parse((await as(roles.users.contributor.cookie).get(`/api/versions/${v.id}/records?variables=wind_speed&sort=wind_speed&order=desc`)).body);
    expect(page.items.map((r) => r.values.wind_speed)).toEqual([6.1, 6, 5.8, 5.7, 5.6, 5.4, 5.3, 5.2, 5]);
    const byTime = recordsPageSchema.parse((await as(roles.users.contributor.cookie).get(`/api/versions/${v.id}/records?variables=wind_speed`)).body);
    expect(byTime.items.filter((r) => r.values.wind_speed === null)).toHaveLength(3);
  });

  test("an unknown sort variable, or a cursor of the time order, is named and refused", async () => {
    const c = as(roles.users.contributor.cookie);
    const unknown = await c.get(`/api/versions/${version.id}/records?sort=salinity`);
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.details.sort[0]).toMatch(/salinity/);
    const timeOrder = recordsPageSchema.parse((await c.get(`/api/versions/${version.id}/records?variables=wind_speed&limit=2`)).body);
    const mixed = await c.get(`/api/versions/${version.id}/records?variables=wind_speed&sort=wind_speed&cursor=${timeOrder.nextCursor}`);
    expect(mixed.status).toBe(400);
    expect(mixed.body.error.details.cursor).toBeDefined();
  });
});

describe("QC report and track", () => {
  test("the report's counts are the QC run's and its flag totals the records'", async () => {
    const res = await as(roles.users.curator.cookie).get(`/api/versions/${version.id}/qc-report`);
    expect(res.status).toBe(200);
    const r = qcReportSchema.parse(res.body);
    const run = await pool.query(`select counts from qc_runs where version_id = $1`, [version.id]);
    // Same counts, keyed by the tests' snake_case labels (shared/compute/flags.ts testLabels).
    const raw = run.rows[0].counts.testCounts as Record<string, Record<string, [number, number]>>;
    expect(Object.keys(raw).length).toBeGreaterThan(0);
    for (const [v, tests] of Object.entries(raw)) for (const [t, c] of Object.entries(tests)) expect(r.testCounts[v]![t.toLowerCase()]).toEqual(c);
    const ws = r.variables.find((v) => v.key === "wind_speed")!;
    const { rows } = await pool.query(`select ${flagSql("wind_speed")} as f, count(*)::int as n from records where dataset_id = $1 group by 1`, [datasetId]);
    for (const x of rows) expect(ws.flags[x.f]).toBe(x.n);
    expect(r.timeline!.rows.length).toBeGreaterThan(0);
  });

  test("a mooring's track answers its nominal position", async () => {
    const res = await as(roles.users.contributor.cookie).get(`/api/versions/${version.id}/track`);
    const t = trackSchema.parse(res.body);
    expect(t.kind).toBe("mooring");
    expect(t.deployment).toMatchObject({ latitude: 41.25, longitude: -27.5 });
  });
});

describe("who may read", () => {
  test("unreleased: members only; released: everyone", async () => {
    const { datasetId: other } = await makeMooringDataset(roles.projectId);
    const v = await buildMooringVersion(other, roles.users.contributor, { start: day, durationS: 6 * 3600, intervalS: 60 });
    const url = `/api/versions/${v.id}/plot?variables=wind_speed`;
    expect((await as(null).get(url)).status).toBe(401);
    expect((await as(roles.users.outsider.cookie).get(url)).status).toBe(403);
    expect((await as(roles.users.contributor.cookie).get(url)).status).toBe(200);
    await releaseVersion(v.id, roles.users.contributor, roles.users.curator);
    for (const path of ["plot?variables=wind_speed", "records?limit=5", "qc-report", "track"]) {
      expect((await as(null).get(`/api/versions/${v.id}/${path}`)).status, path).toBe(200);
      expect((await as(roles.users.outsider.cookie).get(`/api/versions/${v.id}/${path}`)).status, path).toBe(200);
    }
  });
});
