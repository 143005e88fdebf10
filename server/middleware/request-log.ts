import type { RequestHandler } from "express";
import type { Logger } from "pino";
import { logger } from "../lib/logger";

/**
 * One log line per finished request (id, method, path without the query, status, milliseconds) at info, or at
 * error for a 5xx; the health check is not logged. Nothing is built for a request unless a line will be written:
 * a general-purpose HTTP logger serialised every request up front, about a tenth of the catalogue's CPU time in
 * `npm run bench -- --only catalogue`.
 */
export const requestLog: RequestHandler = (req, res, next) => {
  let child: Logger | undefined;
  Object.defineProperty(req, "log", { configurable: true, get: () => (child ??= logger.child({ reqId: req.id })) });
  if (req.url === "/api/health" || !logger.isLevelEnabled("info")) {
    if (logger.isLevelEnabled("error")) res.once("finish", () => res.statusCode >= 500 && line(req, res, 0));
    return next();
  }
  const start = performance.now();
  res.once("finish", () => line(req, res, performance.now() - start));
  res.once("close", () => !res.writableFinished && logger.info({ reqId: req.id, req: { method: req.method, url: req.originalUrl.split("?")[0] } }, "request aborted by the client"));
  next();
};

function line(req: Parameters<RequestHandler>[0], res: Parameters<RequestHandler>[1], ms: number) {
  const fields = { reqId: req.id, req: { method: req.method, url: req.originalUrl.split("?")[0] }, res: { statusCode: res.statusCode }, responseTime: Math.round(ms) };
  if (res.statusCode >= 500) logger.error(fields, "request failed");
  else logger.info(fields, "request completed");
}
