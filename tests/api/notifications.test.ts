import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { notificationListSchema } from "@shared/schemas/curation";
import { db } from "../../server/db/client";
import { mailMessages, notifications } from "../../server/db/schema";
import { ORIGIN, addMembership, as, createTestUser, makeProjectWithRoles, waitForMail, type TestUser } from "../helpers/api";
import { makeDataset, makeVersion } from "../helpers/curation";

/** E-mails reach the local fake SMTP server (stored in mail_messages); in-app notices go to /api/notifications. */
let ctx: Awaited<ReturnType<typeof makeProjectWithRoles>>;
let curator2: TestUser;
beforeAll(async () => {
  ctx = await makeProjectWithRoles();
  curator2 = await createTestUser({ name: "Second Curator" });
  await addMembership(ctx.projectId, curator2.id, "curator");
});

const inbox = async (u: TestUser) => notificationListSchema.parse((await as(u.cookie).get("/api/notifications")).body);
const mailsTo = (email: string) => db.select().from(mailMessages).where(eq(mailMessages.to, [email]));

async function settle() {
  // Mail leaves after commit without holding up the response; give the fake server a moment before asserting absence.
  await new Promise((r) => setTimeout(r, 400));
}

describe("submitted → the project's curators", () => {
  test("each curator gets an e-mail and an in-app notice linking to the review page; the submitter gets neither", async () => {
    const datasetId = await makeDataset(ctx.projectId, "Merrow South submit mail");
    const id = await makeVersion({ datasetId, state: "ready", createdBy: ctx.users.contributor.id, uploaderId: ctx.users.contributor.id });
    const res = await as(ctx.users.contributor.cookie).post(`/api/versions/${id}/submit`).send({ note: "April appended" });
    expect(res.status).toBe(200);
    for (const c of [ctx.users.curator, curator2]) {
      const mail = await waitForMail(c.email, "Review requested: Merrow South submit mail, version 1");
      expect(mail.to).toEqual([c.email]);
      expect(mail.text).toContain(`${ORIGIN}/review/${id}`);
      expect(mail.text).toContain("April appended");
      const box = await inbox(c);
      expect(box.items[0]).toMatchObject({ kind: "version_submitted", link: `/review/${id}`, readAt: null });
    }
    await settle();
    const own = (await mailsTo(ctx.users.contributor.email)).filter((m) => m.subject.includes("submit mail"));
    expect(own).toEqual([]);
    expect((await inbox(ctx.users.contributor)).items.filter((n) => n.link === `/review/${id}`)).toEqual([]);
  });

  test("a curator who built the version is not asked to review it", async () => {
    const datasetId = await makeDataset(ctx.projectId, "Built by a curator");
    const id = await makeVersion({ datasetId, state: "ready", createdBy: curator2.id });
    expect((await as(curator2.cookie).post(`/api/versions/${id}/submit`).send({})).status).toBe(200);
    await waitForMail(ctx.users.curator.email, "Review requested: Built by a curator");
    const rows = await db.select().from(notifications).where(and(eq(notifications.userId, curator2.id), eq(notifications.versionId, id)));
    expect(rows).toEqual([]);
  });
});

describe("decision → the uploader", () => {
  test("a rejection mails the uploader with the reason and a link; an approval too", async () => {
    const datasetId = await makeDataset(ctx.projectId, "Decision mail series");
    const rejected = await makeVersion({ datasetId, state: "in_review", createdBy: ctx.users.contributor.id, uploaderId: ctx.users.contributor.id });
    const approved = await makeVersion({ datasetId, state: "in_review", createdBy: ctx.users.contributor.id, uploaderId: ctx.users.contributor.id });
    await as(ctx.users.curator.cookie).post(`/api/versions/${rejected}/reject`).send({ reason: "Current meter depth is 100 m, not 10 m" });
    await as(ctx.users.curator.cookie).post(`/api/versions/${approved}/approve`).send({});

    const r = await waitForMail(ctx.users.contributor.email, "Rejected: Decision mail series, version 1");
    expect(r.to).toEqual([ctx.users.contributor.email]);
    expect(r.text).toContain("Reason: Current meter depth is 100 m, not 10 m");
    expect(r.text).toContain(`${ORIGIN}/review/${rejected}`);
    const a = await waitForMail(ctx.users.contributor.email, "Approved: Decision mail series, version 2");
    expect(a.text).toContain(`${ORIGIN}/review/${approved}`);

    const box = await inbox(ctx.users.contributor);
    expect(box.items.filter((n) => n.title.includes("Decision mail series")).map((n) => n.kind).sort()).toEqual(["version_approved", "version_rejected"]);
    // The deciding curator hears nothing about their own decision.
    expect((await inbox(ctx.users.curator)).items.filter((n) => n.title.includes("Decision mail series"))).toEqual([]);
  });

  test("the uploader hears about a decision even when someone else built the version", async () => {
    const uploader = await createTestUser({ name: "Field technician" });
    await addMembership(ctx.projectId, uploader.id, "contributor");
    const datasetId = await makeDataset(ctx.projectId, "Uploaded by the technician");
    const id = await makeVersion({ datasetId, state: "in_review", createdBy: ctx.users.contributor.id, uploaderId: uploader.id });
    await as(ctx.users.curator.cookie).post(`/api/versions/${id}/request-changes`).send({ reason: "Add the relative humidity column" });
    const m = await waitForMail(uploader.email, "Changes requested: Uploaded by the technician");
    expect(m.text).toContain("Add the relative humidity column");
    await waitForMail(ctx.users.contributor.email, "Changes requested: Uploaded by the technician");
  });
});

describe("released → members and followers", () => {
  test("members and people who follow the dataset get the release with its page link", async () => {
    const datasetId = await makeDataset(ctx.projectId, "Followed series");
    const v1 = await makeVersion({ datasetId, state: "approved", createdBy: ctx.users.contributor.id });
    // Before any release the dataset is private, so an outsider cannot follow it.
    expect((await as(ctx.users.outsider.cookie).post(`/api/datasets/${datasetId}/follow`).send({})).status).toBe(403);
    const r1 = await as(ctx.users.curator.cookie).post(`/api/versions/${v1}/release`).send({});
    expect(r1.status).toBe(201);
    const follow = await as(ctx.users.outsider.cookie).post(`/api/datasets/${datasetId}/follow`).send({});
    expect(follow.body).toEqual({ following: true });
    expect((await as(ctx.users.outsider.cookie).get(`/api/datasets/${datasetId}/follow`)).body).toEqual({ following: true });

    const v2 = await makeVersion({ datasetId, state: "approved", createdBy: ctx.users.contributor.id });
    const r2 = await as(ctx.users.curator.cookie).post(`/api/versions/${v2}/release`).send({});
    expect(r2.status).toBe(201);
    for (const u of [ctx.users.contributor, curator2, ctx.users.outsider]) {
      const m = await waitForMail(u.email, "Released: Followed series, version 2");
      expect(m.to).toEqual([u.email]);
      expect(m.text).toContain(`${ORIGIN}/releases/${r2.body.id}`);
      expect(m.text).toContain(r2.body.citation);
    }
    // The releasing curator and admins outside the project are not told.
    expect((await inbox(ctx.users.curator)).items.filter((n) => n.link === `/releases/${r2.body.id}`)).toEqual([]);
    expect((await inbox(ctx.users.admin)).items.filter((n) => n.link === `/releases/${r2.body.id}`)).toEqual([]);

    // After unfollowing, the outsider is left out of the next release.
    expect((await as(ctx.users.outsider.cookie).delete(`/api/datasets/${datasetId}/follow`)).body).toEqual({ following: false });
    const v3 = await makeVersion({ datasetId, state: "approved", createdBy: ctx.users.contributor.id });
    const r3 = await as(ctx.users.curator.cookie).post(`/api/versions/${v3}/release`).send({});
    expect((await inbox(ctx.users.outsider)).items.filter((n) => n.link === `/releases/${r3.body.id}`)).toEqual([]);
    expect((await inbox(ctx.users.contributor)).items.filter((n) => n.link === `/releases/${r3.body.id}`)).toHaveLength(1);
  });
});

describe("GET /api/notifications and POST /api/notifications/read", () => {
  test("counts unread notices and marks only the caller's own as read", async () => {
    const datasetId = await makeDataset(ctx.projectId, "Unread counting");
    for (let i = 0; i < 3; i++) {
      const id = await makeVersion({ datasetId, state: "ready", createdBy: ctx.users.contributor.id });
      await as(ctx.users.contributor.cookie).post(`/api/versions/${id}/submit`).send({});
    }
    const before = await inbox(curator2);
    const mine = before.items.filter((n) => n.title.includes("Unread counting"));
    expect(mine).toHaveLength(3);
    const unreadBefore = before.unreadCount;

    // Someone else's notice id is ignored, not revealed.
    const othersId = (await inbox(ctx.users.curator)).items[0]!.id;
    const res = await as(curator2.cookie).post("/api/notifications/read").send({ ids: [mine[0]!.id, othersId] });
    expect(res.status).toBe(200);
    expect(res.body.unreadCount).toBe(unreadBefore - 1);
    expect((await inbox(ctx.users.curator)).items.find((n) => n.id === othersId)!.readAt).toBeNull();

    const all = await as(curator2.cookie).post("/api/notifications/read").send({ all: true });
    expect(all.body.unreadCount).toBe(0);
    expect(all.body.items.every((n: { readAt: string | null }) => n.readAt !== null)).toBe(true);
  });

  test("answers 400 for a body that names nothing to mark", async () => {
    const res = await as(curator2.cookie).post("/api/notifications/read").send({ ids: ["not-an-id"] });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe("validation_failed");
  });

  test("a comment gives the uploader an in-app notice (no e-mail)", async () => {
    const datasetId = await makeDataset(ctx.projectId, "Comment notice");
    const id = await makeVersion({ datasetId, state: "in_review", createdBy: ctx.users.contributor.id, uploaderId: ctx.users.contributor.id });
    await as(ctx.users.curator.cookie).post(`/api/versions/${id}/comments`).send({ body: "Is the 02:00 spike real?" });
    const box = await inbox(ctx.users.contributor);
    expect(box.items.find((n) => n.kind === "comment_added" && n.link === `/review/${id}`)?.body).toBe("Curator: Is the 02:00 spike real?");
    await settle();
    expect((await mailsTo(ctx.users.contributor.email)).filter((m) => m.subject.includes("Comment notice"))).toEqual([]);
  });
});
