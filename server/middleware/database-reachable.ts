import type { RequestHandler } from "express";
import { pool } from "../db/client";

/**
 * better-auth answers a bare 500 when PostgreSQL cannot be reached. A one-row ping first hands that case to the error
 * handler, which answers 503 with the usual message and request id; the ping costs one pooled round trip.
 */
export const databaseReachable: RequestHandler = (_req, _res, next) => {
  pool.query("select 1").then(
    () => next(),
    (err: unknown) => next(err),
  );
};
