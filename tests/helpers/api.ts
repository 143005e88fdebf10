import { randomUUID } from "node:crypto";
import request from "supertest";
import { desc, eq, sql } from "drizzle-orm";
import type { Express } from "express";
import { createApp } from "../../server/app";
import { db } from "../../server/db/client";
import { mailMessages, memberships, projects, user } from "../../server/db/schema";
import { env } from "../../server/env";

export const ORIGIN = env.PUBLIC_URL;
export const PASSWORD = "correct-horse-battery-staple-7";

let shared: Express | undefined;
/** One in-process app for a test file (no listening port; supertest drives it). */
export function testApp(): Express {
  shared ??= createApp({ serveClient: false });
  return shared;
}

export type Role = "visitor" | "outsider" | "contributor" | "curator" | "admin";

export interface TestUser {
  id: string;
  email: string;
  name: string;
  cookie: string;
}

/** Signs up through better-auth, marks the e-mail verified (the verification flow has its own test), signs in. */
export async function createTestUser(opts: { admin?: boolean; name?: string } = {}): Promise<TestUser> {
  const app = testApp();
  const email = `user-${randomUUID().slice(0, 8)}@tests.example`;
  const name = opts.name ?? `Test ${email.slice(5, 13)}`;
  const up = await request(app).post("/api/auth/sign-up/email").set("Origin", ORIGIN).send({ name, email, password: PASSWORD });
  if (up.status !== 200) throw new Error(`sign-up failed: ${up.status} ${JSON.stringify(up.body)}`);
  await db.update(user).set({ emailVerified: true, role: opts.admin ? "admin" : "user" }).where(eq(user.email, email));
  const cookie = await signIn(email);
  const [row] = await db.select({ id: user.id }).from(user).where(eq(user.email, email));
  return { id: row!.id, email, name, cookie };
}

export async function signIn(email: string, password = PASSWORD): Promise<string> {
  const res = await request(testApp()).post("/api/auth/sign-in/email").set("Origin", ORIGIN).send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in failed: ${res.status} ${JSON.stringify(res.body)}`);
  const cookies = ([] as string[]).concat(res.headers["set-cookie"] ?? []);
  return cookies.map((c) => c.split(";")[0]).join("; ");
}

export async function makeProject(): Promise<string> {
  const slug = `p-${randomUUID().slice(0, 8)}`;
  const [p] = await db.insert(projects).values({ slug, name: `Project ${slug}` }).returning();
  return p!.id;
}

export async function addMembership(projectId: string, userId: string, role: "contributor" | "curator") {
  await db.insert(memberships).values({ projectId, userId, role });
}

/** A project with one user per role (plus an outsider who belongs to another project). */
export async function makeProjectWithRoles() {
  const projectId = await makeProject();
  const [contributor, curator, admin, outsider] = await Promise.all([
    createTestUser({ name: "Contributor" }),
    createTestUser({ name: "Curator" }),
    createTestUser({ admin: true, name: "Admin" }),
    createTestUser({ name: "Outsider" }),
  ]);
  await addMembership(projectId, contributor.id, "contributor");
  await addMembership(projectId, curator.id, "curator");
  const otherProject = await makeProject();
  await addMembership(otherProject, outsider.id, "contributor");
  return { projectId, otherProject, users: { contributor, curator, admin, outsider } };
}

/** A supertest call as a role (visitor sends no cookie). Every state-changing call carries the Origin. */
export function as(cookie: string | null) {
  const app = testApp();
  const wrap = (t: request.Test) => (cookie ? t.set("Cookie", cookie) : t).set("Origin", ORIGIN);
  return {
    get: (url: string) => wrap(request(app).get(url)),
    post: (url: string) => wrap(request(app).post(url)),
    patch: (url: string) => wrap(request(app).patch(url)),
    delete: (url: string) => wrap(request(app).delete(url)),
  };
}

/** Waits for a message to reach the fake SMTP server's box. */
export async function waitForMail(to: string, subjectIncludes: string, timeoutMs = 10_000) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const rows = await db
      .select()
      .from(mailMessages)
      .where(sql`${to} = any(${mailMessages.to})`)
      .orderBy(desc(mailMessages.receivedAt));
    const hit = rows.find((m) => m.subject.includes(subjectIncludes));
    if (hit) return hit;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`no mail to ${to} with subject containing "${subjectIncludes}"`);
}
