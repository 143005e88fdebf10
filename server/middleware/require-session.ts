import type { RequestHandler } from "express";
import { fromNodeHeaders } from "better-auth/node";
import { auth } from "../auth";
import { forbidden, unauthenticated } from "../lib/errors";

export interface SessionUser {
  id: string;
  name: string;
  email: string;
  emailVerified: boolean;
  isAdmin: boolean;
}

async function loadUser(req: Parameters<RequestHandler>[0]): Promise<SessionUser | null> {
  if (req.user !== undefined) return req.user;
  // No cookie, no session: visitors (most catalogue and download traffic) skip the session lookup.
  if (!req.headers.cookie) return (req.user = null);
  const session = await auth.api.getSession({ headers: fromNodeHeaders(req.headers) });
  const u = session?.user;
  req.user = u && !u.banned ? { id: u.id, name: u.name, email: u.email, emailVerified: u.emailVerified, isAdmin: u.role === "admin" } : null;
  return req.user;
}

/** Loads the session user if any (visitors get req.user = null). */
export const optionalSession: RequestHandler = async (req, _res, next) => {
  await loadUser(req);
  next();
};

/** 401 unless signed in. */
export const requireSession: RequestHandler = async (req, _res, next) => {
  if (!(await loadUser(req))) throw unauthenticated();
  next();
};

/** 401 when signed out, 403 unless a global admin. */
export const requireAdmin: RequestHandler = async (req, _res, next) => {
  const user = await loadUser(req);
  if (!user) throw unauthenticated();
  if (!user.isAdmin) throw forbidden("Only admins can do this");
  next();
};
