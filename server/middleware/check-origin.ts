import type { RequestHandler } from "express";
import { forbidden } from "../lib/errors";

const SAFE = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * Refuses state-changing requests whose Origin is another site (cross-site request forgery).
 * Browsers always send Origin on such requests; scripts using API tokens send none and pass.
 */
export function checkOrigin(allowed: string[]): RequestHandler {
  const ok = new Set(allowed.map((o) => new URL(o).origin));
  return (req, _res, next) => {
    const origin = req.headers.origin;
    if (SAFE.has(req.method) || origin === undefined || ok.has(origin)) return next();
    next(forbidden("This request came from another site and was refused"));
  };
}
