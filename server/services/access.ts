import { and, eq } from "drizzle-orm";
import type { ProjectRole } from "@shared/schemas/projects";
import { db } from "../db/client";
import { memberships, projects } from "../db/schema";
import { forbidden, notFound, unauthenticated } from "../lib/errors";
import type { SessionUser } from "../middleware/require-session";

export type Access = "read" | "contribute" | "curate" | "administer";

/** The caller's role in a project: a membership role, or null. */
export async function getProjectRole(user: SessionUser | null | undefined, projectId: string): Promise<ProjectRole | null> {
  if (!user) return null;
  const [m] = await db
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.projectId, projectId), eq(memberships.userId, user.id)));
  return m?.role ?? null;
}

/**
 * Checks that the caller may act on a project. read: any member or admin. contribute: contributor,
 * curator or admin. curate: curator or admin. administer: admin only. Visitors get 401, others 403;
 * a project that does not exist is 404 only for callers who could otherwise have seen it.
 */
export async function assertProjectAccess(user: SessionUser | null | undefined, projectId: string, need: Access): Promise<ProjectRole | null> {
  if (!user) throw unauthenticated();
  const [p] = await db.select({ id: projects.id }).from(projects).where(eq(projects.id, projectId));
  const role = p ? await getProjectRole(user, projectId) : null;
  if (user.isAdmin) {
    if (!p) throw notFound("Project");
    return role;
  }
  if (!p || !role) throw forbidden("You are not a member of this project");
  if (need === "administer") throw forbidden("Only admins can do this");
  if (need === "curate" && role !== "curator") throw forbidden("Only the project's curators can do this");
  return role;
}
