import { and, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import type { MarkReadInput, Notification, NotificationKind, NotificationList } from "@shared/schemas/curation";
import type { Db } from "../db/client";
import { db } from "../db/client";
import { datasetFollows, memberships, notifications, user as users } from "../db/schema";
import { env } from "../env";
import { sendMail } from "../mail/send";
import type { SessionUser } from "../middleware/require-session";

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

export interface Notice {
  kind: NotificationKind;
  title: string;
  /** Plain text; the e-mail adds the link and why the person receives it. */
  body: string;
  /** Path inside the app, e.g. /review/<id>. */
  link: string;
  versionId?: string | null;
  /** One line saying why this person hears about it. */
  because: string;
  /** In-app only (comments would flood inboxes). */
  skipMail?: boolean;
}

export interface PendingMail {
  to: string;
  subject: string;
  text: string;
}

/** The absolute link for a path inside the app. */
export const appUrl = (path: string) => new URL(path, env.PUBLIC_URL).toString();

/**
 * Stores in-app notices inside the caller's transaction (they land with the change they report) and
 * returns the e-mails to send once the transaction has committed.
 */
export async function notify(tx: Tx, userIds: Iterable<string>, notice: Notice): Promise<PendingMail[]> {
  const ids = [...new Set(userIds)];
  if (!ids.length) return [];
  await tx.insert(notifications).values(
    ids.map((userId) => ({ userId, kind: notice.kind, title: notice.title, body: notice.body, link: notice.link, versionId: notice.versionId ?? null })),
  );
  if (notice.skipMail) return [];
  const people = await tx.select({ email: users.email, name: users.name }).from(users).where(inArray(users.id, ids));
  return people.map((p) => ({
    to: p.email,
    subject: `[Tauline] ${notice.title}`,
    text: `Hello ${p.name},\n\n${notice.body}\n\nOpen it in Tauline: ${appUrl(notice.link)}\n\n${notice.because}\n`,
  }));
}

/** Sends each message separately (recipients never see each other). Failures are logged by sendMail, never thrown. */
export async function deliver(mails: PendingMail[]): Promise<void> {
  for (const m of mails) await sendMail(m.to, m.subject, m.text);
}

/** Members of a project, optionally only one role. */
export async function projectMemberIds(tx: Tx | Db, projectId: string, role?: "curator" | "contributor"): Promise<string[]> {
  const rows = await tx
    .select({ id: memberships.userId })
    .from(memberships)
    .where(and(eq(memberships.projectId, projectId), role ? eq(memberships.role, role) : undefined));
  return rows.map((r) => r.id);
}

export async function followerIds(tx: Tx | Db, datasetId: string): Promise<string[]> {
  const rows = await tx.select({ id: datasetFollows.userId }).from(datasetFollows).where(eq(datasetFollows.datasetId, datasetId));
  return rows.map((r) => r.id);
}

function toNotification(r: typeof notifications.$inferSelect): Notification {
  return {
    id: r.id,
    kind: r.kind,
    title: r.title,
    body: r.body,
    link: r.link,
    createdAt: r.createdAt.toISOString(),
    readAt: r.readAt ? r.readAt.toISOString() : null,
  };
}

/** The caller's latest notices (newest first) and how many are unread. */
export async function listNotifications(user: SessionUser, limit = 50): Promise<NotificationList> {
  const rows = await db.select().from(notifications).where(eq(notifications.userId, user.id)).orderBy(desc(notifications.createdAt)).limit(limit);
  const [count] = await db
    .select({ n: sql<number>`count(*)::int` })
    .from(notifications)
    .where(and(eq(notifications.userId, user.id), isNull(notifications.readAt)));
  return { items: rows.map(toNotification), unreadCount: count?.n ?? 0 };
}

/** Marks the caller's own notices read; ids of other people's notices are ignored, never revealed. */
export async function markNotificationsRead(user: SessionUser, input: MarkReadInput): Promise<NotificationList> {
  await db
    .update(notifications)
    .set({ readAt: new Date() })
    .where(and(eq(notifications.userId, user.id), isNull(notifications.readAt), "ids" in input ? inArray(notifications.id, input.ids) : undefined));
  return listNotifications(user);
}
