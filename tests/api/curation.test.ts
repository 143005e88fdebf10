import { and, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { curationActions, versionComparisonSchema, versionReviewSchema, type CurationAction } from "@shared/schemas/curation";
import { versionStates, type VersionState } from "@shared/schemas/datasets";
import { db } from "../../server/db/client";
import { auditLog, reviews, versions } from "../../server/db/schema";
import type { SessionUser } from "../../server/middleware/require-session";
import { releaseVersion, retractVersion } from "../../server/services/releases";
import { addMembership, as, createTestUser, makeProjectWithRoles, type TestUser } from "../helpers/api";
import { makeDataset, makeVersion } from "../helpers/curation";
import { packFlags } from "../../server/db/record-flags";

/**
 * The curation state machine: every action × every starting state × every kind of caller, with the
 * database checked after each call (state moved and one audit row, or nothing changed at all).
 */
let ctx: Awaited<ReturnType<typeof makeProjectWithRoles>>;
let curatorBuilder: TestUser;
let adminUploader: TestUser;

const session = (u: TestUser, isAdmin = false): SessionUser => ({ id: u.id, name: u.name, email: u.email, emailVerified: true, isAdmin });

beforeAll(async () => {
  ctx = await makeProjectWithRoles();
  curatorBuilder = await createTestUser({ name: "Curator who built it" });
  await addMembership(ctx.projectId, curatorBuilder.id, "curator");
  adminUploader = await createTestUser({ admin: true, name: "Admin who uploaded it" });
});

type Caller = "visitor" | "outsider" | "contributor" | "curator" | "admin" | "curatorBuilder" | "adminUploader";
const callers: Caller[] = ["visitor", "outsider", "contributor", "curator", "admin", "curatorBuilder", "adminUploader"];
const cookieOf = (c: Caller) =>
  c === "visitor" ? null : c === "curatorBuilder" ? curatorBuilder.cookie : c === "adminUploader" ? adminUploader.cookie : ctx.users[c].cookie;

const routeOf: Record<CurationAction, string> = {
  submit: "submit",
  approve: "approve",
  reject: "reject",
  requestChanges: "request-changes",
  release: "release",
  retract: "retract",
};
const bodyOf: Record<CurationAction, object> = {
  submit: {},
  approve: {},
  reject: { reason: "Wind direction offset of 180° after 14 March" },
  requestChanges: { reason: "Please map the gust column before review" },
  release: {},
  retract: { reason: "Clock drift of 40 min found after release" },
};
const isDecision = (a: CurationAction) => a === "approve" || a === "reject" || a === "requestChanges";

/** What the server must answer: the rule written out independently of the service code. */
function expected(action: CurationAction, state: VersionState, caller: Caller): number {
  if (caller === "visitor") return 401;
  if (caller === "outsider") return 403;
  if (action !== "submit" && caller === "contributor") return 403;
  if (!(curationActions[action].from as readonly string[]).includes(state)) return 409;
  if (isDecision(action) && (caller === "curatorBuilder" || caller === "adminUploader")) return 403;
  return action === "release" ? 201 : 200;
}

/** A version in the given state; the released family is reached through the real release service. */
async function versionIn(state: VersionState, caller: Caller): Promise<string> {
  const datasetId = await makeDataset(ctx.projectId);
  const owner = {
    datasetId,
    createdBy: caller === "curatorBuilder" ? curatorBuilder.id : ctx.users.contributor.id,
    uploaderId: caller === "adminUploader" ? adminUploader.id : ctx.users.contributor.id,
  };
  const releaser = session(ctx.users.curator);
  if (state === "released" || state === "superseded" || state === "retracted") {
    const id = await makeVersion({ ...owner, state: "approved" });
    await releaseVersion(releaser, id, {});
    if (state === "superseded") {
      const newer = await makeVersion({ ...owner, state: "approved" });
      await releaseVersion(releaser, newer, {});
    }
    if (state === "retracted") await retractVersion(releaser, id, { reason: "Set up for the state-machine test" });
    return id;
  }
  return makeVersion({ ...owner, state });
}

const stateOf = async (id: string) => (await db.select({ s: versions.state }).from(versions).where(eq(versions.id, id)))[0]!.s;
const auditRows = (id: string, action: string) =>
  db.select().from(auditLog).where(and(eq(auditLog.entityType, "version"), eq(auditLog.entityId, id), eq(auditLog.action, action)));

describe("state machine: every action × state × caller", () => {
  for (const action of Object.keys(curationActions) as CurationAction[]) {
    for (const state of versionStates) {
      test(`POST /api/versions/:id/${routeOf[action]} from ${state}`, async () => {
        const got: Record<string, number> = {};
        const want: Record<string, number> = {};
        for (const caller of callers) {
          const id = await versionIn(state, caller);
          const auditAction = `version.${action === "requestChanges" ? "request_changes" : action}`;
          const before = (await auditRows(id, auditAction)).length;
          const res = await as(cookieOf(caller)).post(`/api/versions/${id}/${routeOf[action]}`).send(bodyOf[action]);
          got[caller] = res.status;
          want[caller] = expected(action, state, caller);
          const after = await auditRows(id, auditAction);
          if (res.status < 300) {
            expect(await stateOf(id), `${caller}: state after ${action}`).toBe(curationActions[action].to);
            expect(after, `${caller}: one audit row`).toHaveLength(before + 1);
            expect(after.at(-1)).toMatchObject({ fromState: state, toState: curationActions[action].to });
          } else {
            expect(res.body.error.code, `${caller}: error body`).toBeTypeOf("string");
            expect(await stateOf(id), `${caller}: state unchanged`).toBe(state);
            expect(after, `${caller}: no audit row`).toHaveLength(before);
          }
        }
        expect(got).toEqual(want);
      });
    }
  }
});

describe("four eyes", () => {
  test("a curator who uploaded the version cannot approve it, even though someone else built it", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const id = await makeVersion({ datasetId, state: "in_review", createdBy: ctx.users.contributor.id, uploaderId: curatorBuilder.id });
    const res = await as(curatorBuilder.cookie).post(`/api/versions/${id}/approve`).send({});
    expect(res.status).toBe(403);
    expect(res.body.error.message).toMatch(/four-eyes/);
    expect(await stateOf(id)).toBe("in_review");
    const ok = await as(ctx.users.curator.cookie).post(`/api/versions/${id}/approve`).send({});
    expect(ok.status).toBe(200);
    expect(await stateOf(id)).toBe("approved");
  });

  test("an admin who built the version cannot approve it", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const id = await makeVersion({ datasetId, state: "in_review", createdBy: ctx.users.admin.id });
    const res = await as(ctx.users.admin.cookie).post(`/api/versions/${id}/approve`).send({});
    expect(res.status).toBe(403);
  });

  test("the review page tells the builder-curator why they cannot decide", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const id = await makeVersion({ datasetId, state: "in_review", createdBy: curatorBuilder.id });
    const own = await as(curatorBuilder.cookie).get(`/api/versions/${id}/review`);
    expect(own.status).toBe(200);
    expect(own.body.permissions).toMatchObject({ canDecide: false, fourEyesBlocked: true });
    const other = await as(ctx.users.curator.cookie).get(`/api/versions/${id}/review`);
    expect(other.body.permissions).toMatchObject({ canDecide: true, fourEyesBlocked: false });
  });

  test("the review queue leaves out a version for the curator who uploaded it", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const id = await makeVersion({ datasetId, state: "in_review", createdBy: ctx.users.contributor.id, uploaderId: curatorBuilder.id });
    const mine = await as(curatorBuilder.cookie).get("/api/review-queue");
    expect(mine.body.items.map((i: { versionId: string }) => i.versionId)).not.toContain(id);
    const theirs = await as(ctx.users.curator.cookie).get("/api/review-queue");
    expect(theirs.body.items.map((i: { versionId: string }) => i.versionId)).toContain(id);
  });

  test("the review queue lists a version for other curators but not for its builder", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const id = await makeVersion({ datasetId, state: "in_review", createdBy: curatorBuilder.id });
    const mine = await as(curatorBuilder.cookie).get("/api/review-queue");
    expect(mine.body.items.map((i: { versionId: string }) => i.versionId)).not.toContain(id);
    const theirs = await as(ctx.users.curator.cookie).get("/api/review-queue");
    expect(theirs.body.items.map((i: { versionId: string }) => i.versionId)).toContain(id);
  });
});

describe("reasons", () => {
  for (const route of ["reject", "request-changes"]) {
    test(`POST /api/versions/:id/${route} answers 400 naming the reason when it is missing or blank`, async () => {
      const datasetId = await makeDataset(ctx.projectId);
      const id = await makeVersion({ datasetId, state: "in_review", createdBy: ctx.users.contributor.id });
      for (const body of [{}, { reason: "   " }, { reason: "no" }]) {
        const res = await as(ctx.users.curator.cookie).post(`/api/versions/${id}/${route}`).send(body);
        expect(res.status).toBe(400);
        expect(res.body.error.code).toBe("validation_failed");
        expect(res.body.error.details.reason?.[0]).toMatch(/reason/i);
      }
      expect(await stateOf(id)).toBe("in_review");
      expect(await db.select().from(reviews).where(eq(reviews.versionId, id))).toHaveLength(0);
    });
  }

  test("the decision and its reason are stored, and the history shows who moved the version and why", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const id = await makeVersion({ datasetId, state: "ready", createdBy: ctx.users.contributor.id });
    expect((await as(ctx.users.contributor.cookie).post(`/api/versions/${id}/submit`).send({ note: "March appended" })).status).toBe(200);
    const res = await as(ctx.users.curator.cookie).post(`/api/versions/${id}/request-changes`).send({ reason: "Flag the spike at 03:10 UTC" });
    expect(res.status).toBe(200);
    const review = versionReviewSchema.parse(res.body);
    expect(review.version.state).toBe("changes_requested");
    expect(review.history.map((h) => [h.action, h.fromState, h.toState, h.actorName, h.reason])).toEqual([
      ["version.submit", "ready", "in_review", "Contributor", "March appended"],
      ["version.request_changes", "in_review", "changes_requested", "Curator", "Flag the spike at 03:10 UTC"],
    ]);
    const [r] = await db.select().from(reviews).where(eq(reviews.versionId, id));
    expect(r).toMatchObject({ decision: "changes_requested", reason: "Flag the spike at 03:10 UTC", reviewerId: ctx.users.curator.id });
    // The submit note became the first comment of the thread.
    const comments = await as(ctx.users.curator.cookie).get(`/api/versions/${id}/comments`);
    expect(comments.body.items.map((c: { body: string }) => c.body)).toEqual(["March appended"]);
    // After a rebuild, the contributor submits again.
    expect((await as(ctx.users.contributor.cookie).post(`/api/versions/${id}/submit`).send({})).status).toBe(200);
    expect(await stateOf(id)).toBe("in_review");
  });

  test("a reviews row cannot be edited or deleted by raw SQL", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const id = await makeVersion({ datasetId, state: "in_review", createdBy: ctx.users.contributor.id });
    await as(ctx.users.curator.cookie).post(`/api/versions/${id}/reject`).send({ reason: "Sensor swapped mid-record" });
    await expect(db.update(reviews).set({ reason: "changed" }).where(eq(reviews.versionId, id))).rejects.toMatchObject({ cause: { code: "42501" } });
    await expect(db.delete(reviews).where(eq(reviews.versionId, id))).rejects.toMatchObject({ cause: { code: "42501" } });
  });
});

describe("comments", () => {
  test("members read and write the thread; outsiders and visitors cannot", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const id = await makeVersion({ datasetId, state: "in_review", createdBy: ctx.users.contributor.id });
    const post = await as(ctx.users.curator.cookie).post(`/api/versions/${id}/comments`).send({ body: "Why the gap on 12 March?" });
    expect(post.status).toBe(201);
    expect(post.body).toMatchObject({ authorName: "Curator", body: "Why the gap on 12 March?" });
    const reply = await as(ctx.users.contributor.cookie).post(`/api/versions/${id}/comments`).send({ body: "Logger swap; see cruise log." });
    expect(reply.status).toBe(201);
    const list = await as(ctx.users.contributor.cookie).get(`/api/versions/${id}/comments`);
    expect(list.body.items.map((c: { authorName: string }) => c.authorName)).toEqual(["Curator", "Contributor"]);
    expect((await as(ctx.users.outsider.cookie).get(`/api/versions/${id}/comments`)).status).toBe(403);
    expect((await as(null).post(`/api/versions/${id}/comments`).send({ body: "hi" })).status).toBe(401);
  });

  test("an empty comment answers 400 naming the body", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const id = await makeVersion({ datasetId, state: "in_review" });
    const res = await as(ctx.users.curator.cookie).post(`/api/versions/${id}/comments`).send({ body: "  " });
    expect(res.status).toBe(400);
    expect(res.body.error.details.body).toEqual(["Write a comment"]);
  });

  test("an unknown version answers 404 and a malformed id 400", async () => {
    expect((await as(ctx.users.curator.cookie).post(`/api/versions/00000000-0000-4000-8000-000000000000/approve`).send({})).status).toBe(404);
    const bad = await as(ctx.users.curator.cookie).post(`/api/versions/nope/approve`).send({});
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.id).toEqual(["Must be a valid id"]);
  });
});

describe("GET /api/versions/:id/compare", () => {
  test("counts rows added, removed and changed, and flags and values changed per variable", async () => {
    const datasetId = await makeDataset(ctx.projectId);
    const summary = { variables: [{ variable: "wind_speed", unit: "m s-1" }] };
    const v1 = await makeVersion({ datasetId, state: "approved", createdBy: ctx.users.contributor.id, summary });
    const v2 = await makeVersion({ datasetId, state: "in_review", createdBy: ctx.users.contributor.id, summary });
    const t = (h: number) => `2026-03-01T0${h}:00:00Z`;
    // Version 1: five hourly rows, all passed (each version's rows in its partition, as a build makes it).
    await db.execute(sql`select records_partition(${datasetId}, 1), records_partition(${datasetId}, 2)`);
    for (const [h, ws] of [[0, 5], [1, 6], [2, 7], [3, 8], [4, 9]] as const) {
      await db.execute(sql`insert into records (dataset_id, time, valid_from, wind_speed, flags) values (${datasetId}, ${t(h)}, 1, ${ws}, ${packFlags({ wind_speed: 1 })})`);
    }
    // Version 2 rewrites hours 1–4 (closing version 1's rows) and appends hours 5 and 6:
    // hour 1 rewritten identically (not a change), hour 2 new value, hour 3 new flag, hour 4 dropped.
    await db.execute(sql`update records set valid_to = 2 where dataset_id = ${datasetId} and time >= ${t(1)}`);
    for (const [h, ws, f] of [[1, 6, 1], [2, 7.5, 1], [3, 8, 3], [5, 10, 1], [6, 11, 4]] as const) {
      await db.execute(sql`insert into records (dataset_id, time, valid_from, wind_speed, flags) values (${datasetId}, ${t(h)}, 2, ${ws}, ${packFlags({ wind_speed: f })})`);
    }
    const res = await as(ctx.users.curator.cookie).get(`/api/versions/${v2}/compare`);
    expect(res.status).toBe(200);
    const c = versionComparisonSchema.parse(res.body);
    expect(c).toMatchObject({ number: 2, previous: { id: v1, number: 1 }, rowsAdded: 2, rowsRemoved: 1, rowsChanged: 2 });
    expect(c.variables).toEqual([{ variable: "wind_speed", flagsChanged: 1, valuesChanged: 1 }]);

    // The first version has nothing before it: every row counts as added.
    const first = versionComparisonSchema.parse((await as(ctx.users.curator.cookie).get(`/api/versions/${v1}/compare`)).body);
    expect(first).toMatchObject({ previous: null, rowsAdded: 5, rowsRemoved: 0, rowsChanged: 0 });
    expect((await as(ctx.users.outsider.cookie).get(`/api/versions/${v2}/compare`)).status).toBe(403);
  });
});
