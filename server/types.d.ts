import type { Logger } from "pino";
import type { SessionUser } from "./middleware/require-session";

declare global {
  namespace Express {
    interface Request {
      /** Server-made id, echoed in X-Request-Id and error bodies (middleware/request-id.ts). */
      id: string;
      /** This request's logger, bound to its id; made on first use (middleware/request-log.ts). */
      log: Logger;
      /** undefined: not looked up yet; null: visitor. */
      user?: SessionUser | null;
    }
  }
}
export {};
