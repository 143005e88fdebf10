import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { as } from "../helpers/api";
import { releasedFixture } from "../helpers/released";

let f: Awaited<ReturnType<typeof releasedFixture>>;
const before = process.env.DOWNLOAD_RATE_LIMIT;

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
    for (let i = 0; i < 5; i++) statuses.push((await as(null).get(url)).status);
    expect(statuses).toEqual([200, 200, 200, 429, 429]);
    const limited = await as(null).get(url);
    expect(limited.body.error.code).toBe("rate_limited");
    expect(limited.body.error.message).toContain("API token");
    for (let i = 0; i < 5; i++) expect((await as(f.users.outsider.cookie).get(url)).status).toBe(200);
  });
});
