import type { SessionUser } from "./middleware/require-session";

declare global {
  namespace Express {
    interface Request {
      /** undefined: not looked up yet; null: visitor. */
      user?: SessionUser | null;
    }
  }
}
export {};
