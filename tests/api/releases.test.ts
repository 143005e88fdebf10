import { createHash } from "node:crypto";
import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { releaseSchema } from "@shared/schemas/curation";
import { db, pool } from "../../server/db/client";
import { auditLog, projects, releases, versions } from "../../server/db/schema";
import { canReadVersionData, recordReleaseFile } from "../../server/services/releases";
import { ORIGIN, addMembership, as, createTestUser, makeProjectWithRoles, type TestUser } from "../helpers/api";
import { makeDataset, makeVersion } from "../helpers/curation";

let ctx: Awaited<ReturnType<typeof makeProjectWithRoles>>;
let curator2: TestUser;
beforeAll(async () => {
  ctx = await makeProjectWithRoles();
  curator2 = await createTestUser({ name: "Second Curator" });
  await addMembership(ctx.projectId, curator2.id, "curator");
});

async function approvedVersion(datasetId: string) {
  return makeVersion({ datasetId, state: "approved", createdBy: ctx.users.contributor.id, uploaderId: ctx.users.contributor.id });
}
async function release(versionId: string, body: object = {}) {
  const res = await as(ctx.users.curator.cookie).post(`/api/versions/${versionId}/release`).send(body);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return releaseSchema.parse(res.body);
}
const stateOf = async (id: string) => (await db.select({ s: versions.state }).from(versions).where(eq(versions.id, id)))[0]!.s;

/** Runs one raw SQL statement in its own transaction (as psql would) and returns the PostgreSQL error code. */
async function rawSqlError(text: string, params: unknown[] = []): Promise<string | null> {
  const client = await pool.connect();
  try {
    await client.query("begin");
    await client.query(text, params);
    await client.query("commit");
    return null;
  } catch (err) {
    await client.query("rollback").catch(() => {});
    return (err as { code?: string }).code ?? "unknown";
  } finally {
    client.release();
  }
}

describe("POST /api/versions/:id/release", () => {
  test("writes an immutable release with number, citation, licence, notes and stable URL", async () => {
    const datasetId = await makeDataset(ctx.projectId, "Merrow North release test");
    const v = await approvedVersion(datasetId);
    const r = await release(v, { notes: "First month of the 2026 deployment." });
    expect(r).toMatchObject({ releaseNumber: 1, versionNumber: 1, licence: "CC-BY-4.0", notes: "First month of the 2026 deployment.", retracted: null, dataAvailable: true });
    expect(r.stableUrl).toBe(`${ORIGIN}/releases/${r.id}`);
    // Default authors: the builder and uploader (one person here), then the project's curators by name.
    expect(r.authors).toEqual(["Contributor", "Curator", "Second Curator"]);
    const year = new Date(r.releasedAt).getUTCFullYear();
    expect(r.citation).toBe(
      `Contributor, Curator and Second Curator (${year}). Merrow North release test, version 1 [data set]. ${await projectName()}. Tauline release 1. ${ORIGIN}/releases/${r.id}`,
    );
    expect(await stateOf(v)).toBe("released");
  });

  test("takes a chosen licence and author list, and answers 400 naming bad ones", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const v = await approvedVersion(datasetId);
    const bad = await as(ctx.users.curator.cookie).post(`/api/versions/${v}/release`).send({ licence: "all-rights", authors: [] });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.details).sort()).toEqual(["authors", "licence"]);
    expect(await stateOf(v)).toBe("approved");
    const r = await release(v, { licence: "CC0-1.0", authors: ["Merrow Shelf Observing Programme data team"] });
    expect(r.licence).toBe("CC0-1.0");
    expect(r.citation.startsWith("Merrow Shelf Observing Programme data team (")).toBe(true);
  });

  test("a newer release supersedes the previous one in the same transaction, with audit rows for both", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const v1 = await approvedVersion(datasetId);
    const v2 = await approvedVersion(datasetId);
    await release(v1);
    const r2 = await release(v2);
    expect(r2.releaseNumber).toBe(2);
    expect(await stateOf(v1)).toBe("superseded");
    expect(await stateOf(v2)).toBe("released");
    const sup = await db.select().from(auditLog).where(and(eq(auditLog.entityId, v1), eq(auditLog.action, "version.supersede")));
    expect(sup).toHaveLength(1);
    expect(sup[0]).toMatchObject({ fromState: "released", toState: "superseded", actorId: ctx.users.curator.id });
    // Both releases stay listed, newest first; the dataset is now in the public catalogue.
    const list = await as(null).get(`/api/datasets/${datasetId}/releases`);
    expect(list.body.items.map((x: { releaseNumber: number; versionState: string }) => [x.releaseNumber, x.versionState])).toEqual([
      [2, "released"],
      [1, "superseded"],
    ]);
    const cat = await as(null).get("/api/catalogue");
    expect(cat.body.items.find((e: { id: string }) => e.id === datasetId)).toMatchObject({ releasedVersion: 2 });
  });

  test("two curators releasing two versions at once still get release numbers 1 and 2", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const [a, b] = [await approvedVersion(datasetId), await approvedVersion(datasetId)];
    const [ra, rb] = await Promise.all([
      as(ctx.users.curator.cookie).post(`/api/versions/${a}/release`).send({}),
      as(curator2.cookie).post(`/api/versions/${b}/release`).send({}),
    ]);
    expect([ra.status, rb.status]).toEqual([201, 201]);
    expect([ra.body.releaseNumber, rb.body.releaseNumber].sort()).toEqual([1, 2]);
    const states = [await stateOf(a), await stateOf(b)].sort();
    expect(states).toEqual(["released", "superseded"]);
  });
});

async function projectName() {
  return (await db.select({ name: projects.name }).from(projects).where(eq(projects.id, ctx.projectId)))[0]!.name;
}

describe("released data cannot be changed through SQL", () => {
  let released: string;
  let superseded: string;
  let releaseId: string;
  beforeAll(async () => {
    const datasetId = await makeDataset(ctx.projectId);
    superseded = await approvedVersion(datasetId);
    released = await approvedVersion(datasetId);
    await release(superseded);
    releaseId = (await release(released)).id;
    await recordReleaseFile(releaseId, { format: "csv", name: "merrow-v2.csv", sizeBytes: 11, sha256: createHash("sha256").update("hello world").digest("hex") });
  });

  const refused = "42501"; // insufficient_privilege, raised by the curation triggers
  test.each([
    ["edit a released version's summary", "update versions set summary = '{\"rows\": 1}' where id = $1"],
    ["renumber a released version", "update versions set number = 99 where id = $1"],
    ["move a released version back to approved", "update versions set state = 'approved' where id = $1"],
    ["touch a released version's state time", "update versions set state_changed_at = now() where id = $1"],
    ["a no-op update of a released version", "update versions set state = state where id = $1"],
    ["supersede a released version with no newer release", "update versions set state = 'superseded' where id = $1"],
    ["retract a released version without retracting its release", "update versions set state = 'retracted' where id = $1"],
    ["delete a released version", "delete from versions where id = $1"],
    ["retract a release row without retracting its version", "update releases set retracted_at = now(), retraction_reason = 'sneaky' where version_id = $1"],
    ["edit a release's citation", "update releases set citation = 'changed' where version_id = $1"],
    ["change a release's licence", "update releases set licence = 'CC0-1.0' where version_id = $1"],
    ["delete a release", "delete from releases where version_id = $1"],
    ["edit a release file's checksum", "update release_files set sha256 = repeat('0', 64) where release_id = (select id from releases where version_id = $1)"],
    ["delete a release file", "delete from release_files where release_id = (select id from releases where version_id = $1)"],
  ])("refuses to %s", async (_what, text) => {
    expect(await rawSqlError(text, [released])).toBe(refused);
    expect(await stateOf(released)).toBe("released");
  });

  test.each([
    ["edit a superseded version", "update versions set summary = '{}' where id = $1"],
    ["bring a superseded version back to released", "update versions set state = 'released' where id = $1"],
    ["delete a superseded version", "delete from versions where id = $1"],
  ])("refuses to %s", async (_what, text) => {
    expect(await rawSqlError(text, [superseded])).toBe(refused);
    expect(await stateOf(superseded)).toBe("superseded");
  });

  test.each([
    ["truncate versions", "truncate versions cascade"],
    ["truncate releases", "truncate releases cascade"],
    ["truncate release_files", "truncate release_files"],
  ])("refuses to %s", async (_what, text) => {
    expect(await rawSqlError(text)).toBe(refused);
  });

  test("refuses a release row for a version that is not approved, and a released version without a release row", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const ready = await makeVersion({ datasetId, state: "ready" });
    expect(
      await rawSqlError(
        `insert into releases (version_id, dataset_id, release_number, version_number, project_name, dataset_title, authors, citation, stable_url, licence)
         values ($1, $2, 1, 1, 'P', 'D', '{A}', 'c', 'u', 'CC-BY-4.0')`,
        [ready, datasetId],
      ),
    ).toBe(refused);
    expect(await rawSqlError("insert into versions (dataset_id, number, state) values ($1, 7, 'released')", [datasetId])).toBe(refused);
    expect(await rawSqlError("insert into versions (dataset_id, number, state) values ($1, 8, 'superseded')", [datasetId])).toBe(refused);
    const approved = await makeVersion({ datasetId, state: "approved" });
    expect(await rawSqlError("update versions set state = 'released' where id = $1", [approved])).toBe(refused);
    expect(await rawSqlError("update versions set state = 'retracted' where id = $1", [approved])).toBe(refused);
  });

  test("the same released rows are still readable and unchanged afterwards", async () => {
    const r = await as(null).get(`/api/releases/${releaseId}`);
    expect(r.status).toBe(200);
    expect(r.body.licence).toBe("CC-BY-4.0");
    expect(r.body.files).toEqual([
      expect.objectContaining({ format: "csv", name: "merrow-v2.csv", sizeBytes: 11, sha256: "b94d27b9934d3e08a52e52d7da7dabfac484efe37a5380ee9088f7ace2efcde9" }),
    ]);
  });
});

describe("POST /api/versions/:id/retract", () => {
  test("leaves a public tombstone with reason, citation and checksums; the data is then for members only", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const v = await approvedVersion(datasetId);
    const r = await release(v);
    // SHA-256("abc") from FIPS 180-2, appendix B.1.
    await recordReleaseFile(r.id, { format: "csv", name: "abc.csv", sizeBytes: 3, sha256: "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad" });
    expect(await canReadVersionData(null, v)).toBe(true);

    const blank = await as(ctx.users.curator.cookie).post(`/api/versions/${v}/retract`).send({ reason: "" });
    expect(blank.status).toBe(400);
    expect(blank.body.error.details.reason).toBeDefined();

    const res = await as(ctx.users.curator.cookie).post(`/api/versions/${v}/retract`).send({ reason: "Anemometer heading offset found after release" });
    expect(res.status).toBe(200);
    expect(await stateOf(v)).toBe("retracted");

    const publicView = releaseSchema.parse((await as(null).get(`/api/releases/${r.id}`)).body);
    expect(publicView.retracted).toMatchObject({ reason: "Anemometer heading offset found after release", byName: "Curator" });
    expect(publicView.citation).toBe(r.citation);
    expect(publicView.files.map((f) => f.sha256)).toEqual(["ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"]);
    expect(publicView.dataAvailable).toBe(false);
    expect((await as(ctx.users.outsider.cookie).get(`/api/releases/${r.id}`)).body.dataAvailable).toBe(false);
    expect((await as(ctx.users.contributor.cookie).get(`/api/releases/${r.id}`)).body.dataAvailable).toBe(true);

    expect(await canReadVersionData(null, v)).toBe(false);
    expect(await canReadVersionData({ id: ctx.users.contributor.id, name: "", email: "", emailVerified: true, isAdmin: false }, v)).toBe(true);

    // A tombstone is final: no more files, no edits, no second retraction.
    await expect(recordReleaseFile(r.id, { format: "csv", name: "late.csv", sizeBytes: 1, sha256: "0".repeat(64) })).rejects.toMatchObject({ cause: { code: "42501" } });
    expect(await rawSqlError("update releases set retraction_reason = 'other words' where id = $1", [r.id])).toBe("42501");
    expect((await as(ctx.users.curator.cookie).post(`/api/versions/${v}/retract`).send({ reason: "again please" })).status).toBe(409);
    const [row] = await db.select().from(releases).where(eq(releases.id, r.id));
    expect(row!.retractionReason).toBe("Anemometer heading offset found after release");
  });

  test("an unknown release answers 404", async () => {
    expect((await as(null).get("/api/releases/00000000-0000-4000-8000-000000000000")).status).toBe(404);
  });
});

describe("recordReleaseFile", () => {
  test("refuses a checksum that is not 64 lower-case hex digits", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const r = await release(await approvedVersion(datasetId));
    await expect(recordReleaseFile(r.id, { format: "csv", name: "x.csv", sizeBytes: 1, sha256: "ABC" })).rejects.toThrow(/sha256/);
  });
});
