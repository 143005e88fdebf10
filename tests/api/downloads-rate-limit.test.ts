import { randomUUID } from "node:crypto";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { createApp } from "../../server/app";
import { pool } from "../../server/db/client";
import { releasedFixture } from "../helpers/released";

let f: Awaited<ReturnType<typeof releasedFixture>>;
const before = process.env.DOWNLOAD_RATE_LIMIT;
// An app with its own rate-limit scope: the suite's other files download anonymously through the shared one.
const scope = `t-${randomUUID()}:`;
const app = createApp({ serveClient: false, rateLimitScope: scope });

beforeAll(async () => {
  f = await releasedFixture({ rows: 3 });
  process.env.DOWNLOAD_RATE_LIMIT = "3";
});
afterAll(() => {
  if (before === undefined) delete process.env.DOWNLOAD_RATE_LIMIT;
  else process.env.DOWNLOAD_RATE_LIMIT = before;
});

describe("anonymous downloads are rate-limited", () => {
  test("a visitor gets 429 with a message after the limit; a signed-in person is not limited", async () => {
    const url = `/api/v1/versions/${f.versionId}/download`;
    const statuses: number[] = [];
    for (let i = 0; i < 5; i++) statuses.push((await request(app).get(url)).status);
    expect(statuses).toEqual([200, 200, 200, 429, 429]);
    const limited = await request(app).get(url);
    expect(limited.body.error.code).toBe("rate_limited");
    expect(limited.body.error.message).toContain("API token");
    for (let i = 0; i < 5; i++) expect((await request(app).get(url).set("Cookie", f.users.outsider.cookie)).status).toBe(200);
    // The count is kept in the database (so every app server sees it): six anonymous requests, none signed in.
    const { rows } = await pool.query(`select key, hits from request_limits where key like $1`, [`${scope}download-ip:%`]);
    expect(rows.map((r) => r.hits)).toEqual([6]);
  });
});
