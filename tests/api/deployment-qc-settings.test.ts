import { beforeAll, describe, expect, test } from "vitest";
import { defaultQcSettings, deploymentQcSettingsSchema } from "@shared/schemas/qc-settings";
import { pool } from "../../server/db/client";
import { as, makeProjectWithRoles } from "../helpers/api";
import { demoMooringColumnMap } from "@shared/demo/generate";
import { buildMooringVersion, buildVersionFromText } from "../helpers/explore";
import { makeMooringDataset } from "../helpers/pipeline";
import { columnSql } from "../../server/db/record-flags";

/**
 * Thresholds are settings per deployment with defaults (PRODUCT.md, Science): members read them, contributors and
 * curators change them, and the next build of a dataset on that deployment uses them (its settings snapshot).
 */
let ctx: Awaited<ReturnType<typeof makeProjectWithRoles>>;
let ids: Awaited<ReturnType<typeof makeMooringDataset>>;
beforeAll(async () => {
  ctx = await makeProjectWithRoles();
  ids = await makeMooringDataset(ctx.projectId);
});
const url = () => `/api/deployments/${ids.deploymentId}/qc-settings`;

describe("deployment QC settings", () => {
  test("with nothing stored, a member reads the defaults", async () => {
    const res = await as(ctx.users.curator.cookie).get(url());
    expect(res.status).toBe(200);
    const s = deploymentQcSettingsSchema.parse(res.body);
    expect(s.overrides).toEqual({});
    expect(s.settings).toEqual(defaultQcSettings());
    expect(s.updatedAt).toBeNull();
  });

  test("a contributor's overrides are merged over the defaults, and the next build uses them", async () => {
    const overrides = { variables: { wind_speed: { user: { min: 0, max: 20 }, spike: null } }, timing: { gapFactor: 3 } };
    const res = await as(ctx.users.contributor.cookie).patch(url()).send({ overrides });
    expect(res.status).toBe(200);
    const s = deploymentQcSettingsSchema.parse(res.body);
    expect(s.overrides).toEqual(overrides);
    expect(s.settings.variables.wind_speed.user).toEqual({ min: 0, max: 20 });
    expect(s.settings.variables.wind_speed.spike).toBeNull();
    expect(s.settings.variables.wind_speed.sensor).toEqual(defaultQcSettings().variables.wind_speed.sensor);
    expect(s.settings.timing.gapFactor).toBe(3);
    expect(s.updatedByName).toBe(ctx.users.contributor.name);

    const v = await buildMooringVersion(ids.datasetId, ctx.users.contributor, { start: Date.UTC(2026, 9, 1) / 1000, durationS: 6 * 3600, intervalS: 60 });
    const run = (await pool.query(`select settings from qc_runs where version_id = $1`, [v.id])).rows[0].settings;
    expect(run.variables.wind_speed.user).toEqual({ min: 0, max: 20 });
    expect(run.variables.wind_speed.spike).toBeNull();
    expect(run.timing.gapFactor).toBe(3);
    const audit = await pool.query(`select actor_id from audit_log where action = 'deployment.qc_settings' and entity_id = $1`, [ids.deploymentId]);
    expect(audit.rows.map((r) => r.actor_id)).toContain(ctx.users.contributor.id);
  });

  test("a misspelt setting is named by its path and nothing is stored", async () => {
    const before = (await as(ctx.users.curator.cookie).get(url())).body;
    const res = await as(ctx.users.curator.cookie).patch(url()).send({ overrides: { variables: { wind_sped: { user: { max: 20 } } } } });
    expect(res.status).toBe(400);
    expect(res.body.error.details).toEqual({ "overrides.variables.wind_sped": ["Not a QC setting; check the spelling"] });
    expect((await as(ctx.users.curator.cookie).get(url())).body).toEqual(before);
  });

  test("a value the settings refuse is named by its path", async () => {
    const res = await as(ctx.users.curator.cookie).patch(url()).send({ overrides: { variables: { wind_speed: { spike: { suspect: -1, fail: 15 } } } } });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details)).toEqual(["overrides.variables.wind_speed.spike.suspect"]);
  });

  test("a threshold typed as text is named by its path in plain words", async () => {
    const res = await as(ctx.users.curator.cookie).patch(url()).send({ overrides: { variables: { wind_speed: { spike: { suspect: 8, fail: "lots" } } } } });
    expect(res.status).toBe(400);
    expect(res.body.error.details).toEqual({ "overrides.variables.wind_speed.spike.fail": ["Must be a number, not “lots”"] });
  });

  test("an empty object goes back to the defaults", async () => {
    const res = await as(ctx.users.curator.cookie).patch(url()).send({ overrides: {} });
    expect(res.status).toBe(200);
    const s = deploymentQcSettingsSchema.parse(res.body);
    expect(s.overrides).toEqual({});
    expect(s.settings).toEqual(defaultQcSettings());
  });
});

describe("the watch circle recorded on a mooring's deployment", () => {
  /** Builds a four-record file with GPS positions; returns each record's latitude flag and the run's radius. */
  async function buildWithPositions(datasetId: string, overrides: object) {
    // 0.002° of latitude is ~222 m and 0.01° ~1,112 m from the nominal position (1° of latitude ≈ 111.2 km on
    // the sphere of radius 6,371 km; common practice).
    const text = ["time,lat,lon,wspd", "2026-10-01T00:00:00Z,41.25,-27.5,5", "2026-10-01T00:10:00Z,41.252,-27.5,5", "2026-10-01T00:20:00Z,41.26,-27.5,5", "2026-10-01T00:30:00Z,41.25,-27.5,5"].join("\n");
    // The demo's dialect and time column, with positions and wind speed only.
    const map = {
      ...demoMooringColumnMap(),
      columns: [
        { column: "lat", variable: "latitude", unit: "degree_north" },
        { column: "lon", variable: "longitude", unit: "degree_east" },
        { column: "wspd", variable: "wind_speed", unit: "m s-1" },
      ],
    };
    const v = await buildVersionFromText(datasetId, ctx.users.contributor, `${text}\n`, { map, overrides });
    const flags = await pool.query(`select ${columnSql("latitude_qc")} from records where dataset_id = $1 and valid_to is null order by time`, [datasetId]);
    const run = await pool.query(`select settings from qc_runs where version_id = $1`, [v.id]);
    return { flags: flags.rows.map((r) => r.latitude_qc), radius: run.rows[0].settings.location.watchCircleM };
  }

  test("is the location test's radius unless the settings give their own", async () => {
    const m = await makeMooringDataset(ctx.projectId, { latitude: 41.25, longitude: -27.5 });
    await pool.query(`update deployments set watch_circle_radius_m = 500 where id = $1`, [m.deploymentId]);
    const own = await buildWithPositions(m.datasetId, {});
    expect(own.radius).toBe(500);
    // Outside the circle → suspect (DOMAIN.md §11, test 3).
    expect(own.flags).toEqual([1, 1, 3, 1]);

    const wider = await buildWithPositions(m.datasetId, { location: { watchCircleM: 2000 } });
    expect(wider.radius).toBe(2000);
    expect(wider.flags).toEqual([1, 1, 1, 1]);
  });
});

describe("the attenuated-signal test set on a deployment", () => {
  test("flags an anemometer that stops following the wind, and the QC report names the test", async () => {
    // DOMAIN §11 #10 (the suggested attenuated-signal test): the range over a trailing window below a floor. Three
    // hours of lively 1-minute wind, then three hours where the sensor only creeps between 2.00 and 2.06 m/s
    // (range 0.06 < the 0.1 fail floor). A 1-hour window, (t − 3600 s, t], holds this reading and the 59 before
    // it, so the iced readings fail once none of those is lively: from 59 minutes after the stretch starts, 121
    // readings; before that the window still spans at least 0.5 m/s and they pass.
    const m = await makeMooringDataset(ctx.projectId);
    const t0 = Date.UTC(2026, 10, 2) / 1000;
    const iceAt = t0 + 3 * 3600;
    const lines = ["time,wspd"];
    for (let t = t0; t < t0 + 6 * 3600; t += 60) {
      const k = (t - t0) / 60;
      const ws = t < iceAt ? 8 + 3 * Math.sin(k / 7) + (k % 2 ? 1.5 : -1.5) : 2 + 0.03 * (k % 3);
      lines.push(`${new Date(t * 1000).toISOString().replace(".000", "")},${ws.toFixed(2)}`);
    }
    const map = { ...demoMooringColumnMap(), columns: [{ column: "wspd", variable: "wind_speed", unit: "m s-1" }] };
    const overrides = {
      variables: { wind_speed: { spike: null, rateOfChange: null, flatLine: null, attenuatedSignal: { windowS: 3600, suspectBelow: 0.5, failBelow: 0.1, minCount: 3 } } },
    };
    const res = await as(ctx.users.contributor.cookie).patch(`/api/deployments/${m.deploymentId}/qc-settings`).send({ overrides });
    expect(res.status).toBe(200);
    const v = await buildVersionFromText(m.datasetId, ctx.users.contributor, `${lines.join("\n")}\n`, { map });
    const { rows } = await pool.query(`select extract(epoch from time)::float8 as t, ${columnSql("wind_speed_qc")} from records where dataset_id = $1 and valid_to is null order by time`, [
      m.datasetId,
    ]);
    expect(rows).toHaveLength(360);
    const failFrom = iceAt + 59 * 60;
    expect(rows.filter((r) => r.wind_speed_qc !== (r.t < failFrom ? 1 : 4))).toEqual([]);
    const report = await as(ctx.users.curator.cookie).get(`/api/versions/${v.id}/qc-report`);
    expect(report.status).toBe(200);
    expect(report.body.tests).toContain("attenuated_signal");
    expect(report.body.testCounts.wind_speed.attenuated_signal).toEqual([0, 121]);
  });
});

describe("monthly climatology set on a deployment", () => {
  test("judges each record by its own UTC month's bounds, and the QC report names the test", async () => {
    // DOMAIN §11 #5 (climatology: outside seasonal limits → suspect, 3). Invented bounds: October 280–290 K,
    // November 260–284 K, the other months wide. A steady 11.85 °C (285.00 K) air temperature over the night of
    // 31 October passes until 23:50 and is suspect from 00:00 on 1 November, when November's bounds apply.
    const m = await makeMooringDataset(ctx.projectId);
    const t0 = Date.UTC(2026, 9, 31, 22) / 1000;
    const novemberFrom = Date.UTC(2026, 10, 1) / 1000;
    const lines = ["time,airt"];
    for (let t = t0; t < t0 + 4 * 3600; t += 600) lines.push(`${new Date(t * 1000).toISOString().replace(".000", "")},11.85`);
    const map = { ...demoMooringColumnMap(), columns: [{ column: "airt", variable: "air_temperature", unit: "degC" }] };
    const min = Array.from({ length: 12 }, () => 200);
    const max = Array.from({ length: 12 }, () => 330);
    [min[9], max[9], min[10], max[10]] = [280, 290, 260, 284];
    const overrides = { variables: { air_temperature: { climatology: { min, max }, spike: null, rateOfChange: null, flatLine: null } } };
    const res = await as(ctx.users.contributor.cookie).patch(`/api/deployments/${m.deploymentId}/qc-settings`).send({ overrides });
    expect(res.status).toBe(200);
    expect(res.body.settings.variables.air_temperature.climatology).toEqual({ min, max });

    const v = await buildVersionFromText(m.datasetId, ctx.users.contributor, `${lines.join("\n")}\n`, { map });
    const { rows } = await pool.query(
      `select extract(epoch from time)::float8 as t, air_temperature, ${columnSql("air_temperature_qc")} from records where dataset_id = $1 and valid_to is null order by time`,
      [m.datasetId],
    );
    expect(rows).toHaveLength(24);
    expect(rows[0].air_temperature).toBeCloseTo(285, 9);
    expect(rows.filter((r) => r.air_temperature_qc !== (r.t < novemberFrom ? 1 : 3))).toEqual([]);
    const report = await as(ctx.users.curator.cookie).get(`/api/versions/${v.id}/qc-report`);
    expect(report.status).toBe(200);
    expect(report.body.testCounts.air_temperature.climatology).toEqual([12, 0]);
  });

  test("a month without both bounds is named by its place, and nothing is stored", async () => {
    const m = await makeMooringDataset(ctx.projectId);
    const before = (await as(ctx.users.contributor.cookie).get(`/api/deployments/${m.deploymentId}/qc-settings`)).body;
    const min = Array.from({ length: 11 }, () => 270);
    const res = await as(ctx.users.contributor.cookie)
      .patch(`/api/deployments/${m.deploymentId}/qc-settings`)
      .send({ overrides: { variables: { air_temperature: { climatology: { min, max: Array.from({ length: 12 }, () => 300) } } } } });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details)).toEqual(["overrides.variables.air_temperature.climatology.min"]);
    expect((await as(ctx.users.contributor.cookie).get(`/api/deployments/${m.deploymentId}/qc-settings`)).body).toEqual(before);
  });
});
