import { randomUUID } from "node:crypto";
import type { RequestHandler } from "express";

/** Gives every request an id, echoed in X-Request-Id and in error bodies, so a user's report can be found in the logs. */
export const requestId: RequestHandler = (req, res, next) => {
  const id = randomUUID();
  req.id = id;
  res.setHeader("X-Request-Id", id);
  next();
};
