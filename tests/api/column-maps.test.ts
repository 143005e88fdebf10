import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { demoMooringColumnMap } from "../../shared/demo/generate";
import { columnMapRevisionSchema, uploadDetailSchema } from "../../shared/schemas/uploads";
import { db } from "../../server/db/client";
import { auditLog } from "../../server/db/schema";
import { as, makeProjectWithRoles } from "../helpers/api";
import { idFromUrl, listenApp, makeDataset, tusUpload } from "../helpers/uploads";

let ctx: Awaited<ReturnType<typeof makeProjectWithRoles>>;
let ds: Awaited<ReturnType<typeof makeDataset>>;
beforeAll(async () => {
  ctx = await makeProjectWithRoles();
  ds = await makeDataset(ctx.projectId, ctx.users.contributor);
});

describe("POST /api/platforms/:id/column-maps", () => {
  test("saves numbered revisions with history, newest first, each with an audit row", async () => {
    const c = as(ctx.users.contributor.cookie);
    const first = await c.post(`/api/platforms/${ds.platformId}/column-maps`).send({ map: demoMooringColumnMap(), note: "March export" });
    expect(first.status).toBe(201);
    expect(columnMapRevisionSchema.parse(first.body)).toMatchObject({ revision: 1, note: "March export", createdByName: "Contributor" });
    const edited = { ...demoMooringColumnMap(), missingValues: ["-99"] };
    const second = await as(ctx.users.curator.cookie).post(`/api/platforms/${ds.platformId}/column-maps`).send({ map: edited });
    expect(second.body.revision).toBe(2);
    const list = await c.get(`/api/platforms/${ds.platformId}/column-maps`);
    expect(list.status).toBe(200);
    expect(list.body.items.map((r: { revision: number }) => r.revision)).toEqual([2, 1]);
    expect(list.body.items[0].map.missingValues).toEqual(["-99"]);
    const audit = await db.select().from(auditLog).where(eq(auditLog.entityId, ds.platformId));
    expect(audit.filter((a) => a.action === "column_map.save").map((a) => a.toState).sort()).toEqual(["revision 1", "revision 2"]);
  });

  test("answers 400 with a message per problem: no time column, half a wind pair, a unit that does not fit", async () => {
    const c = as(ctx.users.contributor.cookie);
    const noTime = await c.post(`/api/platforms/${ds.platformId}/column-maps`).send({ map: { time: { columns: [] }, columns: [{ column: "w", variable: "wind_speed", unit: "m s-1" }] } });
    expect(noTime.status).toBe(400);
    expect(noTime.body.error.message).toBe("A time column is required: choose the column that holds the time of each record.");
    const halfWind = await c.post(`/api/platforms/${ds.platformId}/column-maps`).send({ map: { time: { columns: ["t"] }, columns: [{ column: "d", variable: "wind_from_direction", unit: "degree" }] } });
    expect(halfWind.status).toBe(400);
    expect(halfWind.body.error.details["map.columns"]).toHaveLength(1);
    expect(halfWind.body.error.message).toContain("this map has only the direction");
    const badUnit = await c.post(`/api/platforms/${ds.platformId}/column-maps`).send({ map: { time: { columns: ["t"] }, columns: [{ column: "p", variable: "air_pressure", unit: "knot" }] } });
    expect(badUnit.status).toBe(400);
    expect(badUnit.body.error.details["map.columns.0.unit"][0]).toContain('Unit "knot" is not allowed for air_pressure');
  });

  test("refuses visitors (401) and other projects' members (403)", async () => {
    const body = { map: demoMooringColumnMap() };
    expect((await as(null).post(`/api/platforms/${ds.platformId}/column-maps`).send(body)).status).toBe(401);
    expect((await as(ctx.users.outsider.cookie).post(`/api/platforms/${ds.platformId}/column-maps`).send(body)).status).toBe(403);
    expect((await as(ctx.users.outsider.cookie).get(`/api/platforms/${ds.platformId}/column-maps`)).status).toBe(403);
  });
});

describe("next month's upload starts from the platform's last map", () => {
  let app: Awaited<ReturnType<typeof listenApp>>;
  beforeAll(async () => {
    app = await listenApp();
  });
  afterAll(async () => app.close());

  test("GET /api/uploads/:id suggests the saved map when the header fits, and the header guess when it does not", async () => {
    const d2 = await makeDataset(ctx.projectId, ctx.users.contributor);
    const saved = { ...demoMooringColumnMap(), missingValues: ["-77"] };
    expect((await as(ctx.users.contributor.cookie).post(`/api/platforms/${d2.platformId}/column-maps`).send({ map: saved })).status).toBe(201);
    const text = "time,wspd,wdir,gust,airt,baro,rh,sst,cur_e,cur_n\n2026-04-01T00:00:00Z,5.1,200,7.0,11.2,1012.3,81,12.1,10.5,-3.2\n";
    const up = await tusUpload(app.base, ctx.users.contributor.cookie, Buffer.from(text), { datasetId: d2.datasetId });
    const d = uploadDetailSchema.parse((await as(ctx.users.contributor.cookie).get(`/api/uploads/${idFromUrl(up.url)}`)).body);
    expect(d.suggestion?.source).toBe("platform");
    expect((d.suggestion?.map as { missingValues: string[] }).missingValues).toEqual(["-77"]);

    const other = await tusUpload(app.base, ctx.users.contributor.cookie, Buffer.from("Time;WSPD (kn);WDIR (deg)\n2026-04-01 00:00:00;10,5;200\n"), { datasetId: d2.datasetId });
    const o = uploadDetailSchema.parse((await as(ctx.users.contributor.cookie).get(`/api/uploads/${idFromUrl(other.url)}`)).body);
    expect(o.suggestion?.source).toBe("headers");
    expect((o.suggestion?.map as { columns: { variable: string; unit: string }[] }).columns[0]).toMatchObject({ variable: "wind_speed", unit: "knot" });
  });
});
