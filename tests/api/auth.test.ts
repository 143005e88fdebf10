import { randomUUID } from "node:crypto";
import request from "supertest";
import { describe, expect, test } from "vitest";
import { createApp } from "../../server/app";
import { ORIGIN, PASSWORD, as, createTestUser, signIn, testApp, waitForMail } from "../helpers/api";

const newEmail = () => `signup-${randomUUID().slice(0, 8)}@tests.example`;
const signUp = (email: string, password = PASSWORD) =>
  request(testApp()).post("/api/auth/sign-up/email").set("Origin", ORIGIN).send({ name: "Marit Solberg", email, password });
const signInRaw = (email: string, password: string) =>
  request(testApp()).post("/api/auth/sign-in/email").set("Origin", ORIGIN).send({ email, password });

function linkIn(text: string): string {
  const m = text.match(/https?:\/\/\S+/);
  if (!m) throw new Error(`no link in: ${text}`);
  return m[0];
}

describe("sign-up and e-mail verification", () => {
  test("sends a verification e-mail through the fake SMTP server and refuses sign-in until it is followed", async () => {
    const email = newEmail();
    const up = await signUp(email);
    expect(up.status).toBe(200);

    const mail = await waitForMail(email, "Confirm your e-mail");
    expect(mail.from).toContain("Tauline");
    const link = linkIn(mail.text);
    expect(link.startsWith(`${ORIGIN}/api/auth/verify-email?token=`)).toBe(true);

    const before = await signInRaw(email, PASSWORD);
    expect(before.status).toBe(403);
    expect(before.body.code).toBe("EMAIL_NOT_VERIFIED");

    const url = new URL(link);
    expect(url.searchParams.get("callbackURL")).toBe("/verified");
    const verify = await request(testApp()).get(url.pathname + url.search);
    expect(verify.status).toBe(302);
    expect(verify.headers.location).toBe("/verified");

    const after = await signInRaw(email, PASSWORD);
    expect(after.status).toBe(200);
    const me = await as(await signIn(email)).get("/api/me");
    expect(me.status).toBe(200);
    expect(me.body.user).toMatchObject({ email, emailVerified: true, isAdmin: false });
  });

  test("rejects passwords shorter than 12 characters", async () => {
    const res = await signUp(newEmail(), "short-pass1");
    expect(res.status).toBe(400);
    expect(res.body.code).toBe("PASSWORD_TOO_SHORT");
  });

  test("rejects a password from the shipped list of common passwords", async () => {
    // "1qaz2wsx3edc" is a keyboard walk found in the common-password dictionary of @zxcvbn-ts/language-common.
    const res = await signUp(newEmail(), "1qaz2wsx3edc");
    expect(res.status).toBe(400);
    expect(res.body.code).toBe("PASSWORD_TOO_COMMON");
  });
});

describe("sign-in", () => {
  test("answers the same for an unknown e-mail and a wrong password", async () => {
    const u = await createTestUser();
    const wrong = await signInRaw(u.email, "not-the-right-password");
    const unknown = await signInRaw(newEmail(), "not-the-right-password");
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body).toEqual(unknown.body);
  });

  test("sets an HttpOnly, SameSite=Lax session cookie", async () => {
    const u = await createTestUser();
    const res = await signInRaw(u.email, PASSWORD);
    const cookie = ([] as string[]).concat(res.headers["set-cookie"] ?? []).find((c) => c.includes("session_token"));
    expect(cookie).toBeDefined();
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
  });

  test("refuses state-changing calls from another site's origin (sign-in and sign-out)", async () => {
    const u = await createTestUser();
    const signInForeign = await request(testApp()).post("/api/auth/sign-in/email").set("Origin", "http://evil.example").send({ email: u.email, password: PASSWORD });
    expect(signInForeign.status).toBe(403);
    const signOutForeign = await request(testApp()).post("/api/auth/sign-out").set("Origin", "http://evil.example").set("Cookie", u.cookie).send({});
    expect(signOutForeign.status).toBe(403);
    expect((await as(u.cookie).get("/api/me")).status).toBe(200);
  });

  test("is rate-limited per client: the attempt over the limit gets 429 with a readable message", async () => {
    const app = createApp({ serveClient: false, authRateLimit: 3, rateLimitScope: `t-${randomUUID()}:` });
    const email = newEmail();
    const statuses: number[] = [];
    for (let i = 0; i < 4; i++) {
      const r = await request(app).post("/api/auth/sign-in/email").set("Origin", ORIGIN).send({ email, password: "whatever-password-1" });
      statuses.push(r.status);
      if (r.status === 429) expect(r.body.error).toMatchObject({ code: "rate_limited" });
    }
    expect(statuses).toEqual([401, 401, 401, 429]);
  });

  test("app servers share the per-client count: the limit holds across two of them, not once per server", async () => {
    // Two apps as two servers behind a balancer (same database, same scope), each with a limit of 3 per window.
    const scope = `t-${randomUUID()}:`;
    const a = createApp({ serveClient: false, authRateLimit: 3, rateLimitScope: scope });
    const b = createApp({ serveClient: false, authRateLimit: 3, rateLimitScope: scope });
    const statuses: number[] = [];
    for (const app of [a, b, a, b, a]) statuses.push((await request(app).post("/api/auth/sign-in/email").set("Origin", ORIGIN).send({ email: newEmail(), password: "whatever-password-1" })).status);
    expect(statuses).toEqual([401, 401, 401, 429, 429]);
    // A third app with a scope of its own still answers: the counts are per scope and client.
    const c = createApp({ serveClient: false, authRateLimit: 3, rateLimitScope: `t-${randomUUID()}:` });
    expect((await request(c).post("/api/auth/sign-in/email").set("Origin", ORIGIN).send({ email: newEmail(), password: "whatever-password-1" })).status).toBe(401);
  });

  test("is rate-limited per account too: the 11th attempt on one address in a minute gets 429, known or not", async () => {
    // An address with no account is limited exactly like a real one, so the limit reveals nothing.
    const email = newEmail();
    const statuses: number[] = [];
    for (let i = 0; i < 10; i++) statuses.push((await signInRaw(email, `wrong-password-number-${i}`)).status);
    expect(statuses).toEqual(Array(10).fill(401));
    const last = await signInRaw(email, PASSWORD);
    expect(last.status).toBe(429);
    expect(last.body.code).toBe("TOO_MANY_ATTEMPTS");
    // Another address from the same client is unaffected.
    expect((await signInRaw(newEmail(), "whatever-password-1")).status).toBe(401);
  });

  test("signing out ends the session", async () => {
    const u = await createTestUser();
    const out = await as(u.cookie).post("/api/auth/sign-out").send({});
    expect(out.status).toBe(200);
    expect((await as(u.cookie).get("/api/me")).status).toBe(401);
  });
});

describe("password reset", () => {
  test("mails a reset link; the new password works, the old one and old sessions do not", async () => {
    const u = await createTestUser();
    const req = await request(testApp())
      .post("/api/auth/request-password-reset")
      .set("Origin", ORIGIN)
      .send({ email: u.email, redirectTo: "/reset-password" });
    expect(req.status).toBe(200);
    const mail = await waitForMail(u.email, "Reset your Tauline password");
    const link = new URL(linkIn(mail.text));
    // better-auth's link checks the token and redirects to our page with ?token=
    const hop = await request(testApp()).get(link.pathname + link.search);
    expect(hop.status).toBe(302);
    const landing = new URL(hop.headers.location!, ORIGIN);
    expect(landing.pathname).toBe("/reset-password");
    const token = landing.searchParams.get("token")!;
    expect(token).toBeTruthy();

    const newPassword = "a-fresh-tide-table-2026";
    const reset = await request(testApp()).post("/api/auth/reset-password").set("Origin", ORIGIN).send({ newPassword, token });
    expect(reset.status).toBe(200);
    expect((await signInRaw(u.email, PASSWORD)).status).toBe(401);
    expect((await signInRaw(u.email, newPassword)).status).toBe(200);
    expect((await as(u.cookie).get("/api/me")).status).toBe(401);
  });
});
