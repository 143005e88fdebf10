import { Router, type RequestHandler } from "express";
import { optionalSession, requireAdmin, requireSession } from "../middleware/require-session";

/**
 * Who may call a route, declared beside it (deny by default): public (anyone; the session is loaded if
 * present), session (signed in; services then check project membership), admin (global admins).
 */
export type RouteAccess = "public" | "session" | "admin";
type Method = "get" | "post" | "patch" | "put" | "delete";

export interface RouteRule {
  method: Uppercase<Method>;
  path: string;
  access: RouteAccess;
}

/** Every route the API declares, for the role-matrix test and the OpenAPI listing. */
export const routeRules: RouteRule[] = [];

const guards: Record<RouteAccess, RequestHandler> = { public: optionalSession, session: requireSession, admin: requireAdmin };

/** A router whose every route must declare its access rule. */
export function apiRouter(base: string) {
  const router = Router();
  const add = (method: Method) => (path: string, access: RouteAccess, handler: RequestHandler) => {
    const full = (base + path).replace(/\/$/, "") || "/";
    if (!routeRules.some((r) => r.method === method.toUpperCase() && r.path === full)) {
      routeRules.push({ method: method.toUpperCase() as Uppercase<Method>, path: full, access });
    }
    router[method](path, guards[access], handler);
  };
  return { router, base, get: add("get"), post: add("post"), patch: add("patch"), put: add("put"), delete: add("delete") };
}
