import { rateLimit } from "express-rate-limit";
import type { RequestHandler } from "express";

/**
 * Limits sign-in, sign-up, password-reset and token requests per client IP. Answers are the same for
 * known and unknown e-mail addresses. The store is in memory: with several app servers behind a
 * balancer, give each a share of the budget or move the store to PostgreSQL (README, "Scaling out").
 */
export function authRateLimit(limit: number, windowS: number): RequestHandler {
  return rateLimit({
    windowMs: windowS * 1000,
    limit,
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
