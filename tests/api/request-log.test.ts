import express from "express";
import request from "supertest";
import { afterEach, describe, expect, test, vi } from "vitest";
import { logger } from "../../server/lib/logger";
import { requestId } from "../../server/middleware/request-id";
import { requestLog } from "../../server/middleware/request-log";
import { testApp } from "../helpers/api";

/** A bare app with the two request middlewares of server/app.ts and three routes. */
function app() {
  const a = express();
  a.use(requestId, requestLog);
  a.get("/api/health", (_req, res) => void res.json({ ok: true }));
  a.get("/api/thing", (req, res) => {
    req.log.debug("inside the route");
    res.json({ ok: true });
  });
  a.get("/api/broken", (_req, res) => void res.status(503).json({ error: "down" }));
  return a;
}

describe("request log", () => {
  const level = logger.level;
  afterEach(() => {
    logger.level = level;
    vi.restoreAllMocks();
  });

  test("one info line per finished request: id, method, path without the query, status, milliseconds", async () => {
    logger.level = "info";
    const info = vi.spyOn(logger, "info").mockImplementation(() => undefined);
    const res = await request(app()).get("/api/thing?q=secret-search");
    expect(res.status).toBe(200);
    const lines = info.mock.calls.filter((c) => c[1] === "request completed");
    expect(lines).toHaveLength(1);
    const fields = lines[0]![0] as Record<string, unknown>;
    expect(fields).toMatchObject({ reqId: res.headers["x-request-id"], req: { method: "GET", url: "/api/thing" }, res: { statusCode: 200 } });
    expect(typeof fields.responseTime).toBe("number");
    expect(JSON.stringify(fields)).not.toContain("secret-search");
  });

  test("a 5xx is logged at error; the health check is not logged", async () => {
    logger.level = "info";
    const info = vi.spyOn(logger, "info").mockImplementation(() => undefined);
    const error = vi.spyOn(logger, "error").mockImplementation(() => undefined);
    await request(app()).get("/api/health");
    expect(info).not.toHaveBeenCalled();
    const res = await request(app()).get("/api/broken");
    expect(res.status).toBe(503);
    expect(error.mock.calls.filter((c) => c[1] === "request failed")[0]![0]).toMatchObject({ reqId: res.headers["x-request-id"], res: { statusCode: 503 } });
  });

  test("req.log is bound to the request id and made only when a route uses it", async () => {
    logger.level = "info";
    vi.spyOn(logger, "info").mockImplementation(() => undefined);
    const child = vi.spyOn(logger, "child");
    await request(app()).get("/api/health");
    expect(child).not.toHaveBeenCalled();
    const res = await request(app()).get("/api/thing");
    expect(child).toHaveBeenCalledWith({ reqId: res.headers["x-request-id"] });
  });

  test("below info (the tests' own level) nothing is logged for a good request, in the real app too", async () => {
    logger.level = "warn";
    const info = vi.spyOn(logger, "info").mockImplementation(() => undefined);
    const res = await request(testApp()).get("/api/v1/catalogue");
    expect(res.status).toBe(200);
    expect(info).not.toHaveBeenCalled();
  });
});
