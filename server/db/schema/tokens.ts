import { sql } from "drizzle-orm";
import { check, index, pgEnum, pgTable, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { apiTokenScopes } from "@shared/schemas/tokens";
import { user } from "./auth";

export const apiTokenScope = pgEnum("api_token_scope", apiTokenScopes);

/**
 * Personal API tokens for scripts. Only the SHA-256 of the secret is stored (the secret is 256 random bits, so a
 * fast hash is enough); the secret is shown once when the token is made. Revoked tokens stay for the record.
 */
export const apiTokens = pgTable(
  "api_tokens",
  {
    id: uuid().primaryKey().defaultRandom(),
    userId: text().notNull().references(() => user.id, { onDelete: "cascade" }),
    name: text().notNull(),
    scope: apiTokenScope().notNull(),
    tokenHash: text().notNull().unique("api_tokens_token_hash_key"),
    prefix: text().notNull(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    lastUsedAt: timestamp({ withTimezone: true }),
    expiresAt: timestamp({ withTimezone: true }),
    revokedAt: timestamp({ withTimezone: true }),
  },
  (t) => [
    index("api_tokens_user_idx").on(t.userId),
    check("api_tokens_hash_check", sql`${t.tokenHash} ~ '^[0-9a-f]{64}$'`),
    check("api_tokens_name_check", sql`length(trim(${t.name})) between 1 and 100`),
  ],
);
