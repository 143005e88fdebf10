import { asc, desc, eq } from "drizzle-orm";
import type { AdminUser, MailMessage, Me } from "@shared/schemas/users";
import { db } from "../db/client";
import { mailMessages, memberships, projects, user as users } from "../db/schema";
import { AppError, notFound } from "../lib/errors";
import type { SessionUser } from "../middleware/require-session";
import { writeAudit } from "./audit";

async function membershipsByUser() {
  const rows = await db
    .select({ userId: memberships.userId, projectId: memberships.projectId, projectName: projects.name, role: memberships.role })
    .from(memberships)
    .innerJoin(projects, eq(projects.id, memberships.projectId))
    .orderBy(asc(projects.name));
  const out = new Map<string, Me["memberships"]>();
  for (const r of rows) {
    const list = out.get(r.userId) ?? [];
    list.push({ projectId: r.projectId, projectName: r.projectName, role: r.role });
    out.set(r.userId, list);
  }
  return out;
}

export async function getMe(user: SessionUser): Promise<Me> {
  const rows = await db
    .select({ projectId: memberships.projectId, projectName: projects.name, role: memberships.role })
    .from(memberships)
    .innerJoin(projects, eq(projects.id, memberships.projectId))
    .where(eq(memberships.userId, user.id))
    .orderBy(asc(projects.name));
  return { user: { id: user.id, name: user.name, email: user.email, emailVerified: user.emailVerified, isAdmin: user.isAdmin }, memberships: rows };
}

export async function listUsers(): Promise<AdminUser[]> {
  const [rows, ms] = await Promise.all([db.select().from(users).orderBy(asc(users.name)), membershipsByUser()]);
  return rows.map((u) => ({
    id: u.id,
    name: u.name,
    email: u.email,
    emailVerified: u.emailVerified,
    isAdmin: u.role === "admin",
    createdAt: u.createdAt.toISOString(),
    memberships: ms.get(u.id) ?? [],
  }));
}

export async function setAdmin(actor: SessionUser, userId: string, isAdmin: boolean): Promise<AdminUser> {
  if (actor.id === userId && !isAdmin) throw new AppError("conflict", "You cannot remove your own admin role; ask another admin", 409);
  await db.transaction(async (tx) => {
    const [before] = await tx.select({ role: users.role }).from(users).where(eq(users.id, userId));
    if (!before) throw notFound("User");
    await tx.update(users).set({ role: isAdmin ? "admin" : "user", updatedAt: new Date() }).where(eq(users.id, userId));
    await writeAudit(tx, { actorId: actor.id, action: "user.set_admin", entityType: "user", entityId: userId, fromState: before.role, toState: isAdmin ? "admin" : "user" });
  });
  const all = await listUsers();
  return all.find((u) => u.id === userId)!;
}

export async function listMail(limit = 200): Promise<MailMessage[]> {
  const rows = await db.select().from(mailMessages).orderBy(desc(mailMessages.receivedAt)).limit(limit);
  return rows.map((m) => ({ id: m.id, from: m.from, to: m.to, subject: m.subject, text: m.text, receivedAt: m.receivedAt.toISOString() }));
}
