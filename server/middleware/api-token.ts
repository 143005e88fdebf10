import type { RequestHandler } from "express";
import { forbidden } from "../lib/errors";
import { authenticateToken, bearerToken } from "../services/tokens";

const SAFE = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * Scripts authenticate with `Authorization: Bearer <token>` instead of a session cookie. A valid token makes
 * its owner the request's user (services then check project membership as for a session); a bad token is
 * refused outright rather than treated as a visitor, so a script never silently gets less data. Tokens only
 * read through the JSON API; uploads with an upload-scope token go through the tus endpoint.
 */
export const apiTokenAuth: RequestHandler = async (req, res, next) => {
  const secret = bearerToken(req.headers.authorization);
  if (!secret) return next();
  const t = await authenticateToken(secret, "read");
  if (!SAFE.has(req.method)) throw forbidden("API tokens can read and download only; sign in to the web app to change things");
  req.user = t.user;
  res.locals.apiToken = { id: t.tokenId, scope: t.scope };
  next();
};
