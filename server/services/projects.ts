import { and, asc, count, eq, inArray } from "drizzle-orm";
import type { AddMemberInput, CreateProjectInput, Member, Project, ProjectRole, UpdateProjectInput } from "@shared/schemas/projects";
import { db } from "../db/client";
import { datasets, memberships, platforms, projects, user as users } from "../db/schema";
import { AppError, conflict, notFound } from "../lib/errors";
import type { SessionUser } from "../middleware/require-session";
import { assertProjectAccess } from "./access";
import { writeAudit } from "./audit";

type ProjectRow = typeof projects.$inferSelect;

const toProject = (p: ProjectRow, myRole: ProjectRole | null, counts?: Project["counts"]): Project => ({
  id: p.id,
  name: p.name,
  slug: p.slug,
  description: p.description,
  createdAt: p.createdAt.toISOString(),
  myRole,
  ...(counts ? { counts } : {}),
});

function isUniqueViolation(err: unknown, constraint?: string): boolean {
  const e = (err as { cause?: { code?: string; constraint?: string } }).cause ?? (err as { code?: string; constraint?: string });
  return e?.code === "23505" && (!constraint || e.constraint === constraint);
}
export { isUniqueViolation };

/** Projects the caller belongs to; admins see every project. */
export async function listProjects(user: SessionUser): Promise<Project[]> {
  const mine = await db.select({ projectId: memberships.projectId, role: memberships.role }).from(memberships).where(eq(memberships.userId, user.id));
  const roleOf = new Map(mine.map((m) => [m.projectId, m.role]));
  const rows = user.isAdmin
    ? await db.select().from(projects).orderBy(asc(projects.name))
    : mine.length
      ? await db.select().from(projects).where(inArray(projects.id, [...roleOf.keys()])).orderBy(asc(projects.name))
      : [];
  return rows.map((p) => toProject(p, roleOf.get(p.id) ?? null));
}

export async function getProject(user: SessionUser, projectId: string): Promise<Project> {
  const role = await assertProjectAccess(user, projectId, "read");
  const [p] = await db.select().from(projects).where(eq(projects.id, projectId));
  if (!p) throw notFound("Project");
  const [[pl], [ds], [mm]] = await Promise.all([
    db.select({ n: count() }).from(platforms).where(eq(platforms.projectId, projectId)),
    db.select({ n: count() }).from(datasets).where(eq(datasets.projectId, projectId)),
    db.select({ n: count() }).from(memberships).where(eq(memberships.projectId, projectId)),
  ]);
  return toProject(p, role, { platforms: pl!.n, datasets: ds!.n, members: mm!.n });
}

export async function createProject(user: SessionUser, input: CreateProjectInput): Promise<Project> {
  if (!user.isAdmin) throw new AppError("forbidden", "Only admins can create projects", 403);
  try {
    return await db.transaction(async (tx) => {
      const [p] = await tx.insert(projects).values(input).returning();
      await writeAudit(tx, { actorId: user.id, action: "project.create", entityType: "project", entityId: p!.id, details: { name: p!.name } });
      return toProject(p!, null, { platforms: 0, datasets: 0, members: 0 });
    });
  } catch (err) {
    if (isUniqueViolation(err)) throw conflict("A project with this short name already exists", { slug: ["Already taken"] });
    throw err;
  }
}

export async function updateProject(user: SessionUser, projectId: string, input: UpdateProjectInput): Promise<Project> {
  await assertProjectAccess(user, projectId, "curate");
  try {
    await db.transaction(async (tx) => {
      await tx.update(projects).set(input).where(eq(projects.id, projectId));
      await writeAudit(tx, { actorId: user.id, action: "project.update", entityType: "project", entityId: projectId, details: input });
    });
  } catch (err) {
    if (isUniqueViolation(err)) throw conflict("A project with this short name already exists", { slug: ["Already taken"] });
    throw err;
  }
  return getProject(user, projectId);
}

export async function listMembers(user: SessionUser, projectId: string): Promise<Member[]> {
  await assertProjectAccess(user, projectId, "read");
  const rows = await db
    .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, since: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.projectId, projectId))
    .orderBy(asc(users.name));
  return rows.map((r) => ({ ...r, since: r.since.toISOString() }));
}

/** Adds a member or changes their role (admins only). */
export async function addMember(user: SessionUser, projectId: string, input: AddMemberInput): Promise<Member> {
  await assertProjectAccess(user, projectId, "administer");
  const [target] = await db.select().from(users).where(eq(users.email, input.email.toLowerCase()));
  if (!target) throw new AppError("unprocessable", "No Tauline account has this e-mail address; ask them to sign up first", 422, { email: ["No account with this address"] });
  return db.transaction(async (tx) => {
    const [before] = await tx.select().from(memberships).where(and(eq(memberships.projectId, projectId), eq(memberships.userId, target.id)));
    const [m] = await tx
      .insert(memberships)
      .values({ projectId, userId: target.id, role: input.role })
      .onConflictDoUpdate({ target: [memberships.projectId, memberships.userId], set: { role: input.role } })
      .returning();
    await writeAudit(tx, {
      actorId: user.id,
      action: before ? "membership.change_role" : "membership.add",
      entityType: "project",
      entityId: projectId,
      fromState: before?.role ?? null,
      toState: input.role,
      details: { userId: target.id },
    });
    return { userId: target.id, name: target.name, email: target.email, role: m!.role, since: m!.createdAt.toISOString() };
  });
}

export async function removeMember(user: SessionUser, projectId: string, userId: string): Promise<void> {
  await assertProjectAccess(user, projectId, "administer");
  await db.transaction(async (tx) => {
    const [gone] = await tx.delete(memberships).where(and(eq(memberships.projectId, projectId), eq(memberships.userId, userId))).returning();
    if (!gone) throw notFound("Membership");
    await writeAudit(tx, { actorId: user.id, action: "membership.remove", entityType: "project", entityId: projectId, fromState: gone.role, details: { userId } });
  });
}
