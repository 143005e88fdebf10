import { and, asc, eq } from "drizzle-orm";
import type { Comment, CommentInput } from "@shared/schemas/curation";
import { db } from "../db/client";
import { datasetFollows, user as users, versionComments } from "../db/schema";
import type { SessionUser } from "../middleware/require-session";
import { reviewPath, versionForMember } from "./curation";
import { getDataset } from "./datasets";
import { notify } from "./notifications";

// GET /api/versions/:id/comments
/** The thread on a version, oldest first; members of the project and admins. */
export async function listComments(user: SessionUser, versionId: string): Promise<Comment[]> {
  await versionForMember(user, versionId, "read");
  const rows = await db
    .select({ c: versionComments, name: users.name })
    .from(versionComments)
    .leftJoin(users, eq(users.id, versionComments.authorId))
    .where(eq(versionComments.versionId, versionId))
    .orderBy(asc(versionComments.createdAt), asc(versionComments.id));
  return rows.map((r) => ({
    id: r.c.id,
    versionId: r.c.versionId,
    authorId: r.c.authorId,
    authorName: r.name ?? "Former member",
    body: r.c.body,
    createdAt: r.c.createdAt.toISOString(),
  }));
}

// POST /api/versions/:id/comments
/** Adds a comment; the version's uploader, builder and earlier commenters get an in-app notice. */
export async function addComment(user: SessionUser, versionId: string, input: CommentInput): Promise<Comment> {
  const v = await versionForMember(user, versionId, "read");
  const c = await db.transaction(async (tx) => {
    const [c] = await tx.insert(versionComments).values({ versionId, authorId: user.id, body: input.body }).returning();
    const earlier = await tx.selectDistinct({ id: versionComments.authorId }).from(versionComments).where(eq(versionComments.versionId, versionId));
    const people = [v.uploaderId, v.createdBy, ...earlier.map((e) => e.id)].filter((id): id is string => !!id && id !== user.id);
    await notify(tx, people, {
      kind: "comment_added",
      title: `Comment on ${v.datasetTitle}, version ${v.number}`,
      body: `${user.name}: ${input.body.length > 280 ? `${input.body.slice(0, 277)}…` : input.body}`,
      link: reviewPath(versionId),
      versionId,
      because: "",
      skipMail: true,
    });
    return c!;
  });
  return { id: c.id, versionId, authorId: user.id, authorName: user.name, body: c.body, createdAt: c.createdAt.toISOString() };
}

// GET /api/datasets/:id/follow
export async function getFollow(user: SessionUser, datasetId: string) {
  await getDataset(user, datasetId);
  const [row] = await db.select().from(datasetFollows).where(and(eq(datasetFollows.datasetId, datasetId), eq(datasetFollows.userId, user.id)));
  return { following: !!row };
}

// POST /api/datasets/:id/follow
/** Anyone who can see the dataset may follow it and hear about new releases. */
export async function followDataset(user: SessionUser, datasetId: string) {
  await getDataset(user, datasetId);
  await db.insert(datasetFollows).values({ datasetId, userId: user.id }).onConflictDoNothing();
  return { following: true };
}

// DELETE /api/datasets/:id/follow
export async function unfollowDataset(user: SessionUser, datasetId: string) {
  await getDataset(user, datasetId);
  await db.delete(datasetFollows).where(and(eq(datasetFollows.datasetId, datasetId), eq(datasetFollows.userId, user.id)));
  return { following: false };
}
