import { rateLimit } from "express-rate-limit";
import type { RequestHandler } from "express";
import { PgRateLimitStore } from "../lib/pg-rate-limit-store";

/**
 * Limits sign-in, sign-up, password-reset and token requests per client IP. Answers are the same for
 * known and unknown e-mail addresses. Counts live in PostgreSQL, shared by every app server (README, "Scaling
 * out"); `scope` prefixes the keys, so apps given different scopes count apart.
 */
export function authRateLimit(limit: number, windowS: number, scope = ""): RequestHandler {
  return rateLimit({
    windowMs: windowS * 1000,
    limit,
    store: new PgRateLimitStore(`${scope}auth-ip:`),
    standardHeaders: "draft-8",
    legacyHeaders: false,
    handler: (req, res) => {
      res.status(429).json({
        error: { code: "rate_limited", message: `Too many attempts; wait ${windowS} seconds and try again`, requestId: String(req.id) },
      });
    },
  });
}

export const SENSITIVE_AUTH_PATHS = [
  "/api/auth/sign-in/email",
  "/api/auth/sign-up/email",
  "/api/auth/request-password-reset",
  "/api/auth/reset-password",
  "/api/auth/send-verification-email",
  "/api/auth/change-password",
];
