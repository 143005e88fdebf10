import { eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { db } from "../../server/db/client";
import { auditLog } from "../../server/db/schema";
import { as, makeProjectWithRoles } from "../helpers/api";
import { makeBuildVersion } from "../helpers/pipeline";

let ctx: Awaited<ReturnType<typeof makeProjectWithRoles>>;
beforeAll(async () => {
  ctx = await makeProjectWithRoles();
});

describe("POST /api/projects/:id/platforms", () => {
  test("creates a mooring and records who did it in the audit log", async () => {
    const res = await as(ctx.users.contributor.cookie).post(`/api/projects/${ctx.projectId}/platforms`).send({ name: "Outer buoy", kind: "mooring", wmoNumber: "4612345" });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ name: "Outer buoy", kind: "mooring", wmoNumber: "4612345", projectId: ctx.projectId });
    const rows = await db.select().from(auditLog).where(eq(auditLog.entityId, res.body.id));
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ action: "platform.create", actorId: ctx.users.contributor.id });
  });

  test("answers 400 naming each bad field", async () => {
    const res = await as(ctx.users.contributor.cookie).post(`/api/projects/${ctx.projectId}/platforms`).send({ name: "", kind: "boat", wmoNumber: "12" });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe("validation_failed");
    expect(Object.keys(res.body.error.details).sort()).toEqual(["kind", "name", "wmoNumber"]);
    expect(res.body.error.details.wmoNumber).toEqual(["WMO number has 5 or 7 digits"]);
  });

  test("answers 409 for a second platform with the same name in the project", async () => {
    const c = as(ctx.users.contributor.cookie);
    expect((await c.post(`/api/projects/${ctx.projectId}/platforms`).send({ name: "Twin", kind: "drifter" })).status).toBe(201);
    const again = await c.post(`/api/projects/${ctx.projectId}/platforms`).send({ name: "Twin", kind: "drifter" });
    expect(again.status).toBe(409);
    expect(again.body.error.details.name).toBeDefined();
  });

  test("answers 400 for an id that is not a uuid, without touching the database", async () => {
    const res = await as(ctx.users.contributor.cookie).get(`/api/projects/not-an-id/platforms`);
    expect(res.status).toBe(400);
    expect(res.body.error.details.id).toEqual(["Must be a valid id"]);
  });
});

describe("POST /api/platforms/:id/deployments", () => {
  let platformId: string;
  beforeAll(async () => {
    const p = await as(ctx.users.contributor.cookie).post(`/api/projects/${ctx.projectId}/platforms`).send({ name: "Shelf mooring", kind: "mooring" });
    platformId = p.body.id;
  });

  test("stores position, depths, heights and coastline bearing", async () => {
    const body = {
      name: "SM-1",
      startTime: "2026-03-01T00:00:00Z",
      endTime: "2026-06-01T00:00:00Z",
      latitude: 41.5,
      longitude: -124.9,
      waterDepthM: 200,
      watchCircleRadiusM: 500,
      anemometerHeightM: 4,
      currentMeterDepthM: 10,
      coastlineOffshoreBearingDeg: 270,
    };
    const res = await as(ctx.users.curator.cookie).post(`/api/platforms/${platformId}/deployments`).send(body);
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ ...body, startTime: "2026-03-01T00:00:00.000Z", endTime: "2026-06-01T00:00:00.000Z", projectId: ctx.projectId });
  });

  test("refuses out-of-range latitude, non-positive heights, a lone longitude and an end before the start", async () => {
    const res = await as(ctx.users.contributor.cookie).post(`/api/platforms/${platformId}/deployments`).send({
      name: "SM-bad",
      startTime: "2026-03-01T00:00:00Z",
      endTime: "2026-02-01T00:00:00Z",
      latitude: 91,
      anemometerHeightM: 0,
      coastlineOffshoreBearingDeg: 360,
    });
    expect(res.status).toBe(400);
    const d = res.body.error.details;
    expect(d.latitude).toContain("Latitude must be between −90 and 90");
    expect(d.anemometerHeightM).toEqual(["Anemometer height must be greater than 0"]);
    expect(d.coastlineOffshoreBearingDeg).toEqual(["Bearing must be in [0, 360)"]);
    // The cross-field checks run once the fields themselves are valid.
    const res2 = await as(ctx.users.contributor.cookie).post(`/api/platforms/${platformId}/deployments`).send({
      name: "SM-bad2",
      startTime: "2026-03-01T00:00:00Z",
      endTime: "2026-02-01T00:00:00Z",
      longitude: 10,
    });
    expect(res2.status).toBe(400);
    expect(res2.body.error.details.endTime).toEqual(["End must be after start"]);
    expect(res2.body.error.details.latitude).toEqual(["Give both latitude and longitude, or neither"]);
  });

  test("refuses a time without a zone", async () => {
    const res = await as(ctx.users.contributor.cookie).post(`/api/platforms/${platformId}/deployments`).send({ name: "SM-z", startTime: "2026-03-01T00:00:00" });
    expect(res.status).toBe(400);
    expect(res.body.error.details.startTime[0]).toMatch(/ISO 8601 time with a zone/);
  });
});

describe("PATCH: fields left out stay, blank fields clear", () => {
  test("a deployment's optional fields are cleared by null or blank, and kept when left out", async () => {
    const c = as(ctx.users.contributor.cookie);
    const p = await c.post(`/api/projects/${ctx.projectId}/platforms`).send({ name: "Edited mooring", kind: "mooring", wmoNumber: "4612399", description: "Inner shelf" });
    const d = await c.post(`/api/platforms/${p.body.id}/deployments`).send({
      name: "EM-1",
      startTime: "2026-03-01T00:00:00Z",
      endTime: "2026-06-01T00:00:00Z",
      latitude: 41.5,
      longitude: -124.9,
      waterDepthM: 200,
      anemometerHeightM: 4,
      notes: "Recovered early",
    });
    expect(d.status).toBe(201);
    const cleared = await c.patch(`/api/deployments/${d.body.id}`).send({ endTime: "", latitude: null, longitude: null, waterDepthM: null, notes: "" });
    expect(cleared.status).toBe(200);
    expect(cleared.body).toMatchObject({ name: "EM-1", endTime: null, latitude: null, longitude: null, waterDepthM: null, notes: null, anemometerHeightM: 4 });
    const kept = await c.patch(`/api/deployments/${d.body.id}`).send({ name: "EM-1b" });
    expect(kept.body).toMatchObject({ name: "EM-1b", startTime: "2026-03-01T00:00:00.000Z", anemometerHeightM: 4, endTime: null });
    // Clearing one coordinate alone would leave half a position: refused, naming the other.
    const half = await c.patch(`/api/deployments/${d.body.id}`).send({ latitude: 41.6 });
    expect(half.status).toBe(400);
    expect(half.body.error.details.longitude).toEqual(["Give both latitude and longitude, or neither"]);
    // The start cannot be cleared.
    expect((await c.patch(`/api/deployments/${d.body.id}`).send({ startTime: "" })).status).toBe(400);

    const platform = await c.patch(`/api/platforms/${p.body.id}`).send({ wmoNumber: "", description: null });
    expect(platform.status).toBe(200);
    expect(platform.body).toMatchObject({ name: "Edited mooring", wmoNumber: null, description: null });
  });

  test("a dataset's deployment can be chosen or cleared until its first version is built, and only from its project", async () => {
    const c = as(ctx.users.contributor.cookie);
    const p = await c.post(`/api/projects/${ctx.projectId}/platforms`).send({ name: "Drifter fleet B", kind: "drifter" });
    const dep = await c.post(`/api/platforms/${p.body.id}/deployments`).send({ name: "Release B", startTime: "2026-05-10T00:00:00Z" });
    const ds = await c.post(`/api/projects/${ctx.projectId}/datasets`).send({ title: "Fleet B tracks" });
    expect(ds.body.deploymentId).toBeNull();
    const chosen = await c.patch(`/api/datasets/${ds.body.id}`).send({ deploymentId: dep.body.id });
    expect(chosen.status).toBe(200);
    expect(chosen.body).toMatchObject({ deploymentId: dep.body.id, platformName: "Drifter fleet B" });
    expect((await c.patch(`/api/datasets/${ds.body.id}`).send({ deploymentId: "" })).body.deploymentId).toBeNull();
    // Another project's deployment (a forged id) is refused.
    const op = await as(ctx.users.outsider.cookie).post(`/api/projects/${ctx.otherProject}/platforms`).send({ name: "Elsewhere", kind: "mooring" });
    const od = await as(ctx.users.outsider.cookie).post(`/api/platforms/${op.body.id}/deployments`).send({ name: "E-1", startTime: "2026-05-10T00:00:00Z" });
    const forged = await c.patch(`/api/datasets/${ds.body.id}`).send({ deploymentId: od.body.id });
    expect(forged.status).toBe(422);
    expect(forged.body.error.details.deploymentId).toEqual(["Choose a deployment of this project"]);
    // Once a version is built the deployment is fixed; other fields can still change.
    const built = await makeBuildVersion(ctx.projectId, ctx.users.contributor.id, "ready", "succeeded");
    const late = await c.patch(`/api/datasets/${built.datasetId}`).send({ deploymentId: dep.body.id });
    expect(late.status).toBe(409);
    expect(late.body.error.details.deploymentId).toEqual(["Fixed once a version is built"]);
    expect((await c.patch(`/api/datasets/${built.datasetId}`).send({ description: "Still editable" })).status).toBe(200);
  });

  test("a dataset's and a project's description are cleared by a blank value", async () => {
    const ds = await as(ctx.users.contributor.cookie).post(`/api/projects/${ctx.projectId}/datasets`).send({ title: "Edited dataset", description: "Draft notes" });
    expect(ds.status).toBe(201);
    const edited = await as(ctx.users.contributor.cookie).patch(`/api/datasets/${ds.body.id}`).send({ description: "" });
    expect(edited.status).toBe(200);
    expect(edited.body).toMatchObject({ title: "Edited dataset", description: null });
    const proj = await as(ctx.users.curator.cookie).patch(`/api/projects/${ctx.projectId}`).send({ description: null });
    expect(proj.status).toBe(200);
    expect(proj.body.description).toBeNull();
  });
});

describe("constraints live in the database too", () => {
  test("raw SQL cannot store a latitude of 95, a zero anemometer height or an end before the start", async () => {
    const p = await as(ctx.users.contributor.cookie).post(`/api/projects/${ctx.projectId}/platforms`).send({ name: "Raw SQL buoy", kind: "mooring" });
    const insert = (cols: string) =>
      db.execute(sql.raw(`insert into deployments (platform_id, name, start_time, ${cols.split("=")[0]}) values ('${p.body.id}', 'raw-${Math.random()}', '2026-01-01Z', ${cols.split("=")[1]})`));
    await expect(insert("latitude=95")).rejects.toThrow();
    await expect(insert("anemometer_height_m=0")).rejects.toThrow();
    await expect(insert("end_time='2025-01-01Z'")).rejects.toThrow();
    await expect(insert("water_depth_m=150")).resolves.toBeDefined();
  });

  test("the audit log refuses UPDATE and DELETE", async () => {
    const pgMessage = (q: Promise<unknown>) => q.then(() => "accepted", (e: { cause?: { message?: string } }) => e.cause?.message ?? "");
    expect(await pgMessage(db.execute(sql`update audit_log set reason = 'changed' where true`))).toMatch(/append-only \(UPDATE refused\)/);
    expect(await pgMessage(db.execute(sql`delete from audit_log where true`))).toMatch(/append-only \(DELETE refused\)/);
  });
});

describe("POST /api/projects/:id/datasets", () => {
  test("refuses a deployment that belongs to another project (forged id) with 422", async () => {
    const other = await as(ctx.users.outsider.cookie).post(`/api/projects/${ctx.otherProject}/platforms`).send({ name: "Foreign", kind: "mooring" });
    const dep = await as(ctx.users.outsider.cookie).post(`/api/platforms/${other.body.id}/deployments`).send({ name: "F-1", startTime: "2026-01-01T00:00:00Z" });
    expect(dep.status).toBe(201);
    const res = await as(ctx.users.contributor.cookie).post(`/api/projects/${ctx.projectId}/datasets`).send({ title: "Borrowed", deploymentId: dep.body.id });
    expect(res.status).toBe(422);
    expect(res.body.error.details.deploymentId).toBeDefined();
  });

  test("an unreleased dataset is hidden from visitors (401) and other projects (403), and absent from the catalogue", async () => {
    const created = await as(ctx.users.contributor.cookie).post(`/api/projects/${ctx.projectId}/datasets`).send({ title: "Hidden draft" });
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ licence: "CC-BY-4.0", versions: [], latestRelease: null });
    expect((await as(null).get(`/api/datasets/${created.body.id}`)).status).toBe(401);
    expect((await as(ctx.users.outsider.cookie).get(`/api/datasets/${created.body.id}`)).status).toBe(403);
    const cat = await as(null).get(`/api/catalogue?q=Hidden`);
    expect(cat.status).toBe(200);
    expect(cat.body.items.map((d: { id: string }) => d.id)).not.toContain(created.body.id);
  });
});
