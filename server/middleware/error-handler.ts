import type { ErrorRequestHandler, RequestHandler } from "express";
import { ZodError } from "zod";
import type { ApiErrorBody } from "@shared/errors";
import { AppError, zodDetails } from "../lib/errors";
import { logger } from "../lib/logger";

const PG_UNAVAILABLE = new Set(["ECONNREFUSED", "ECONNRESET", "57P01", "57P02", "57P03", "08006", "08001", "08003"]);

function isDatabaseDown(err: unknown): boolean {
  const e = err as { code?: string; message?: string; cause?: unknown };
  if (!e) return false;
  if (e.code && PG_UNAVAILABLE.has(e.code)) return true;
  if (typeof e.message === "string" && /Connection terminated|connection timeout|timeout exceeded when trying to connect/i.test(e.message)) return true;
  return e.cause ? isDatabaseDown(e.cause) : false;
}

function send(res: Parameters<ErrorRequestHandler>[2], status: number, body: ApiErrorBody) {
  if (res.headersSent) return res.end();
  res.status(status).json(body);
}

/** The only place that turns errors into HTTP responses. No stack, SQL or path ever reaches the client. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  const requestId = String(req.id);
  if (err instanceof ZodError) {
    return send(res, 400, {
      error: { code: "validation_failed", message: "Some fields need attention", details: zodDetails(err), requestId },
    });
  }
  if (err instanceof AppError) {
    if (err.cause) req.log?.warn({ err: err.cause }, err.message);
    return send(res, err.status, { error: { code: err.code, message: err.message, details: err.details, requestId } });
  }
  // body-parser errors: malformed JSON, too large
  const status = (err as { status?: number; type?: string }).status;
  const type = (err as { type?: string }).type;
  if (type === "entity.parse.failed") {
    return send(res, 400, { error: { code: "validation_failed", message: "The request body is not valid JSON", requestId } });
  }
  if (type === "entity.too.large") {
    return send(res, 413, { error: { code: "payload_too_large", message: "The request body is too large", requestId } });
  }
  if (status && status >= 400 && status < 500) {
    return send(res, status, { error: { code: "validation_failed", message: "The request could not be read", requestId } });
  }
  if (isDatabaseDown(err)) {
    (req.log ?? logger).error({ err }, "database unavailable");
    res.setHeader("Retry-After", "5");
    return send(res, 503, {
      error: { code: "unavailable", message: `The database is not reachable right now; try again in a moment (ref: ${requestId})`, requestId },
    });
  }
  (req.log ?? logger).error({ err }, "unhandled error");
  return send(res, 500, { error: { code: "internal", message: `Something went wrong (ref: ${requestId})`, requestId } });
};

export const notFoundHandler: RequestHandler = (req, res) => {
  res.status(404).json({ error: { code: "not_found", message: `No API route ${req.method} ${req.path}`, requestId: String(req.id) } });
};
