import { sql } from "drizzle-orm";
import { check, index, integer, pgTable, text, timestamp } from "drizzle-orm/pg-core";

/**
 * Request counts of the app's rate limits (sign-in per client and per account, anonymous downloads, token
 * creation), shared by every app server so N servers allow the limit once, not N times. One row per limit and
 * key (e.g. "auth-ip:203.0.113.7") for the current window; `reset_at` ends it (server/lib/pg-rate-limit-store.ts).
 */
export const requestLimits = pgTable(
  "request_limits",
  {
    key: text().primaryKey(),
    hits: integer().notNull(),
    resetAt: timestamp({ withTimezone: true }).notNull(),
  },
  (t) => [index("request_limits_reset_at_idx").on(t.resetAt), check("request_limits_hits_check", sql`${t.hits} >= 0`)],
);
