import { rateLimit } from "express-rate-limit";
import type { RequestHandler } from "express";
import { idParamsSchema } from "@shared/schemas/common";
import { createApiTokenInputSchema } from "@shared/schemas/tokens";
import { apiRouter } from "../lib/routes";
import { PgRateLimitStore } from "../lib/pg-rate-limit-store";
import { createToken, listTokens, revokeToken } from "../services/tokens";

/** Token creation per account and 10 minutes (SECURITY.md: token creation is rate-limited). */
export const tokenCreateLimit: RequestHandler = rateLimit({
  windowMs: 10 * 60_000,
  // In PostgreSQL, so the limit holds across app servers.
  store: new PgRateLimitStore("token-create:"),
  limit: 20,
  standardHeaders: "draft-8",
  legacyHeaders: false,
  keyGenerator: (req) => `user:${req.user?.id ?? "anon"}`,
  handler: (req, res) => {
    res.status(429).json({ error: { code: "rate_limited", message: "Too many new tokens; wait 10 minutes and try again", requestId: String(req.id) } });
  },
});

export const tokensApi = apiRouter("/api/v1/tokens");

// GET /api/v1/tokens
tokensApi.get("/", "session", async (req, res) => {
  res.json({ items: await listTokens(req.user!) });
});

// POST /api/v1/tokens
tokensApi.post("/", "session", async (req, res) => {
  const input = createApiTokenInputSchema.parse(req.body ?? {});
  const limited = await new Promise<boolean>((resolve, reject) => {
    res.once("finish", () => resolve(true));
    void Promise.resolve(tokenCreateLimit(req, res, (err?: unknown) => (err ? reject(err) : resolve(false))));
  });
  if (limited) return;
  res.set("Cache-Control", "no-store");
  res.status(201).json(await createToken(req.user!, input));
});

// DELETE /api/v1/tokens/:id
tokensApi.delete("/:id", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await revokeToken(req.user!, id));
});
