import request from "supertest";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { db } from "../../server/db/client";
import { apiTokens, uploads } from "../../server/db/schema";
import { hashToken } from "../../server/services/tokens";
import { as, ORIGIN, testApp } from "../helpers/api";
import { makeVersion } from "../helpers/curation";
import { fixtureRows, fixtureSummary, insertRecords, releasedFixture } from "../helpers/released";

let f: Awaited<ReturnType<typeof releasedFixture>>;
let draft: string;

const newToken = async (cookie: string, scope: "read" | "upload", name = `script ${scope}`) => {
  const res = await as(cookie).post("/api/v1/tokens").send({ name, scope });
  expect(res.status).toBe(201);
  return res.body as { id: string; token: string; prefix: string; scope: string };
};

/** Starts a tus upload (creation request) of `body` to the fixture dataset, authenticated by a bearer token. */
function tusCreate(token: string, body: string) {
  return request(testApp())
    .post("/api/uploads")
    .set("Tus-Resumable", "1.0.0")
    .set("Upload-Length", String(Buffer.byteLength(body)))
    .set("Upload-Metadata", `datasetId ${Buffer.from(f.datasetId).toString("base64")},filename ${Buffer.from("merrow-script.csv").toString("base64")}`)
    .set("Authorization", `Bearer ${token}`);
}

beforeAll(async () => {
  f = await releasedFixture({ rows: 30 });
  draft = await makeVersion({ datasetId: f.datasetId, state: "ready", createdBy: f.users.contributor.id, summary: fixtureSummary(fixtureRows(3)) });
  await insertRecords(f.datasetId, 2, fixtureRows(3, [""], Date.parse("2026-05-01T00:00:00Z")));
});

describe("personal API tokens", () => {
  test("the secret is shown once; the database keeps only its SHA-256; the list never shows it", async () => {
    const t = await newToken(f.users.contributor.cookie, "read");
    expect(t.token).toMatch(/^tln_[A-Za-z0-9_-]{43}$/);
    const [row] = await db.select().from(apiTokens).where(eq(apiTokens.id, t.id));
    expect(row!.tokenHash).toBe(hashToken(t.token));
    expect(JSON.stringify(row)).not.toContain(t.token.slice(4));
    const list = await as(f.users.contributor.cookie).get("/api/v1/tokens");
    expect(list.status).toBe(200);
    const mine = list.body.items.find((x: { id: string }) => x.id === t.id);
    expect(mine).toMatchObject({ scope: "read", prefix: t.token.slice(0, 10), lastUsedAt: null, revokedAt: null });
    expect(JSON.stringify(list.body)).not.toContain(t.token);
    // Someone else's list does not show it.
    const other = await as(f.users.curator.cookie).get("/api/v1/tokens");
    expect(other.body.items.some((x: { id: string }) => x.id === t.id)).toBe(false);
  });

  test("a read token downloads its owner's drafts and records when it was last used", async () => {
    const t = await newToken(f.users.contributor.cookie, "read");
    const res = await request(testApp()).get(`/api/v1/versions/${draft}/download`).set("Authorization", `Bearer ${t.token}`);
    expect(res.status).toBe(200);
    expect(res.text.split("\n")[0]).toContain("wind_speed_qc");
    const [row] = await db.select().from(apiTokens).where(eq(apiTokens.id, t.id));
    expect(row!.lastUsedAt).not.toBeNull();
    // The outsider's token is the outsider: 403 on the draft.
    const o = await newToken(f.users.outsider.cookie, "read");
    expect((await request(testApp()).get(`/api/v1/versions/${draft}/download`).set("Authorization", `Bearer ${o.token}`)).status).toBe(403);
  });

  test("tokens only read through the JSON API: a state change with a token is refused", async () => {
    const t = await newToken(f.users.contributor.cookie, "upload");
    const res = await request(testApp()).post("/api/v1/tokens").set("Authorization", `Bearer ${t.token}`).send({ name: "from a token", scope: "read" });
    expect(res.status).toBe(403);
    expect(res.body.error.message).toContain("read and download only");
  });

  test("scopes on tus uploads: an upload token uploads as its owner; a read token is refused (403)", async () => {
    const body = "time,wspd\n2026-05-01T00:00:00Z,4.2\n";
    const read = await newToken(f.users.contributor.cookie, "read");
    const refused = await tusCreate(read.token, body);
    expect(refused.status).toBe(403);
    expect(refused.text).toContain("upload scope");

    const up = await newToken(f.users.contributor.cookie, "upload");
    const created = await tusCreate(up.token, body);
    expect(created.status).toBe(201);
    const patched = await request(testApp())
      .patch(new URL(created.headers.location!, ORIGIN).pathname)
      .set("Tus-Resumable", "1.0.0")
      .set("Upload-Offset", "0")
      .set("Content-Type", "application/offset+octet-stream")
      .set("Authorization", `Bearer ${up.token}`)
      .send(Buffer.from(body));
    expect(patched.status).toBe(204);
    const rows = await db.select().from(uploads).where(eq(uploads.datasetId, f.datasetId));
    expect(rows.find((u) => u.originalName === "merrow-script.csv")?.uploaderId).toBe(f.users.contributor.id);
    // An outsider's upload token does not open someone else's dataset.
    const o = await newToken(f.users.outsider.cookie, "upload");
    expect((await tusCreate(o.token, body)).status).toBe(403);
  });

  test("a revoked token, an unknown token and a malformed one are refused with 401", async () => {
    const t = await newToken(f.users.contributor.cookie, "upload");
    const del = await as(f.users.contributor.cookie).delete(`/api/v1/tokens/${t.id}`);
    expect(del.status).toBe(200);
    expect(del.body.revokedAt).not.toBeNull();
    const get = (tok: string) => request(testApp()).get(`/api/v1/versions/${f.versionId}/download`).set("Authorization", `Bearer ${tok}`);
    const revoked = await get(t.token);
    expect(revoked.status).toBe(401);
    expect(revoked.body.error.message).toContain("revoked");
    expect((await tusCreate(t.token, "x")).status).toBe(401);
    expect((await get(`tln_${"A".repeat(43)}`)).status).toBe(401);
    expect((await get("not-a-token")).status).toBe(401);
    // Another person cannot revoke it (not found to them).
    expect((await as(f.users.curator.cookie).delete(`/api/v1/tokens/${t.id}`)).status).toBe(404);
  });

  test("an expired token is refused", async () => {
    const t = await newToken(f.users.contributor.cookie, "read");
    await db.update(apiTokens).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(apiTokens.id, t.id));
    const res = await request(testApp()).get(`/api/v1/tokens`).set("Authorization", `Bearer ${t.token}`);
    expect(res.status).toBe(401);
    expect(res.body.error.message).toContain("expired");
  });

  test("bad input names the field", async () => {
    const res = await as(f.users.contributor.cookie).post("/api/v1/tokens").send({ name: " ", scope: "admin" });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details).sort()).toEqual(["name", "scope"]);
  });
});
