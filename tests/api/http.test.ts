import request from "supertest";
import { describe, expect, test } from "vitest";
import { as, createTestUser, testApp } from "../helpers/api";

describe("HTTP conventions", () => {
  test("security headers: strict CSP (self only), nosniff, referrer policy, no X-Powered-By", async () => {
    const res = await request(testApp()).get("/api/health");
    expect(res.status).toBe(200);
    const csp = res.headers["content-security-policy"];
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("script-src 'self'");
    expect(csp).not.toMatch(/https?:\/\//);
    expect(res.headers["x-content-type-options"]).toBe("nosniff");
    expect(res.headers["referrer-policy"]).toBe("strict-origin-when-cross-origin");
    expect(res.headers["x-powered-by"]).toBeUndefined();
    expect(res.headers["x-request-id"]).toMatch(/^[0-9a-f-]{36}$/);
  });

  test("malformed JSON gets 400 in the one error shape, with no stack or path", async () => {
    const u = await createTestUser({ admin: true });
    const res = await as(u.cookie).post("/api/projects").set("Content-Type", "application/json").send('{"name": "x",');
    expect(res.status).toBe(400);
    expect(res.body).toEqual({ error: { code: "validation_failed", message: "The request body is not valid JSON", requestId: res.headers["x-request-id"] } });
    expect(JSON.stringify(res.body)).not.toMatch(/at |\/work\/|node_modules/);
  });

  test("a JSON body over 1 MB gets 413", async () => {
    const u = await createTestUser({ admin: true });
    const res = await as(u.cookie).post("/api/projects").set("Content-Type", "application/json").send(JSON.stringify({ name: "x".repeat(1_100_000) }));
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe("payload_too_large");
  });

  test("an unknown API route gets 404 in the error shape", async () => {
    const res = await request(testApp()).get("/api/no-such-thing");
    expect(res.status).toBe(404);
    expect(res.body.error).toMatchObject({ code: "not_found" });
  });

  test("SQL-looking search text is only text", async () => {
    const res = await request(testApp()).get("/api/catalogue").query({ q: "'; drop table datasets; --" });
    expect(res.status).toBe(200);
    expect(res.body.items).toEqual([]);
    expect((await request(testApp()).get("/api/catalogue").query({ kind: "submarine" })).status).toBe(400);
  });

  test("a state-changing API call from another site is refused even with a valid session", async () => {
    const u = await createTestUser({ admin: true });
    const res = await request(testApp()).post("/api/projects").set("Cookie", u.cookie).set("Origin", "http://evil.example").send({ name: "Forged", slug: "forged" });
    expect(res.status).toBe(403);
  });
});
