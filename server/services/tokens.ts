import { createHash, randomBytes } from "node:crypto";
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import type { ApiToken, ApiTokenScope, CreateApiTokenInput, CreatedApiToken } from "@shared/schemas/tokens";
import { db } from "../db/client";
import { apiTokens, user as users } from "../db/schema";
import { AppError, notFound } from "../lib/errors";
import type { SessionUser } from "../middleware/require-session";
import { writeAudit } from "./audit";

/** Tokens start with this, so people (and secret scanners) can recognise them. */
export const TOKEN_PREFIX = "tln_";
/** At most this many live tokens per person. */
const MAX_LIVE_TOKENS = 50;
/** last_used_at is written at most this often per token, so a busy script does not write on every request. */
const LAST_USED_EVERY_MS = 60_000;

export const hashToken = (secret: string) => createHash("sha256").update(secret, "utf8").digest("hex");

function toApiToken(t: typeof apiTokens.$inferSelect): ApiToken {
  return {
    id: t.id,
    name: t.name,
    scope: t.scope,
    prefix: t.prefix,
    createdAt: t.createdAt.toISOString(),
    lastUsedAt: t.lastUsedAt?.toISOString() ?? null,
    expiresAt: t.expiresAt?.toISOString() ?? null,
    revokedAt: t.revokedAt?.toISOString() ?? null,
  };
}

// GET /api/v1/tokens
/** The caller's own tokens, newest first (revoked ones too, for the record). */
export async function listTokens(user: SessionUser): Promise<ApiToken[]> {
  const rows = await db.select().from(apiTokens).where(eq(apiTokens.userId, user.id)).orderBy(desc(apiTokens.createdAt));
  return rows.map(toApiToken);
}

// POST /api/v1/tokens
/** Makes a token; the secret is in this answer only (the database keeps its SHA-256). */
export async function createToken(user: SessionUser, input: CreateApiTokenInput): Promise<CreatedApiToken> {
  const [{ n }] = (await db
    .select({ n: sql<number>`count(*)::int` })
    .from(apiTokens)
    .where(and(eq(apiTokens.userId, user.id), isNull(apiTokens.revokedAt)))) as [{ n: number }];
  if (n >= MAX_LIVE_TOKENS) throw new AppError("conflict", `You have ${MAX_LIVE_TOKENS} live tokens; revoke one you no longer use first`, 409);
  const secret = TOKEN_PREFIX + randomBytes(32).toString("base64url");
  const row = await db.transaction(async (tx) => {
    const [t] = await tx
      .insert(apiTokens)
      .values({
        userId: user.id,
        name: input.name,
        scope: input.scope,
        tokenHash: hashToken(secret),
        prefix: secret.slice(0, TOKEN_PREFIX.length + 6),
        expiresAt: input.expiresInDays ? new Date(Date.now() + input.expiresInDays * 86_400_000) : null,
      })
      .returning();
    await writeAudit(tx, { actorId: user.id, action: "token.create", entityType: "api_token", entityId: t!.id, details: { name: input.name, scope: input.scope } });
    return t!;
  });
  return { ...toApiToken(row), token: secret };
}

// DELETE /api/v1/tokens/:id
/** Revokes one of the caller's tokens (idempotent); someone else's token is "not found". */
export async function revokeToken(user: SessionUser, id: string): Promise<ApiToken> {
  const [t] = await db.select().from(apiTokens).where(and(eq(apiTokens.id, id), eq(apiTokens.userId, user.id)));
  if (!t) throw notFound("Token");
  if (t.revokedAt) return toApiToken(t);
  const row = await db.transaction(async (tx) => {
    const [r] = await tx.update(apiTokens).set({ revokedAt: new Date() }).where(eq(apiTokens.id, id)).returning();
    await writeAudit(tx, { actorId: user.id, action: "token.revoke", entityType: "api_token", entityId: id, fromState: "live", toState: "revoked" });
    return r!;
  });
  return toApiToken(row);
}

export interface TokenAuth {
  user: SessionUser;
  tokenId: string;
  scope: ApiTokenScope;
}

/** Why a bearer token was refused, for the person running the script. */
export class TokenRefused extends AppError {
  constructor(message: string, status = 401) {
    super(status === 401 ? "unauthenticated" : "forbidden", message, status);
  }
}

/**
 * Resolves `Authorization: Bearer <token>` to its owner. Unknown, revoked and expired tokens are refused
 * (401), as are tokens whose owner is banned; `need: "upload"` also refuses read-only tokens (403).
 */
export async function authenticateToken(secret: string, need: ApiTokenScope = "read"): Promise<TokenAuth> {
  if (!secret.startsWith(TOKEN_PREFIX) || secret.length > 200) throw new TokenRefused("This is not a Tauline API token; make one on the API tokens page");
  const [row] = await db
    .select({ t: apiTokens, u: users })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(eq(apiTokens.tokenHash, hashToken(secret)));
  if (!row) throw new TokenRefused("This API token is not known; check it was copied whole, or make a new one");
  if (row.t.revokedAt) throw new TokenRefused("This API token was revoked; make a new one on the API tokens page");
  if (row.t.expiresAt && row.t.expiresAt.getTime() <= Date.now()) throw new TokenRefused("This API token has expired; make a new one on the API tokens page");
  if (row.u.banned) throw new TokenRefused("This account is suspended");
  if (need === "upload" && row.t.scope !== "upload") throw new TokenRefused("This token may only read; uploads need a token with the upload scope", 403);
  if (!row.t.lastUsedAt || Date.now() - row.t.lastUsedAt.getTime() > LAST_USED_EVERY_MS) {
    await db.update(apiTokens).set({ lastUsedAt: new Date() }).where(eq(apiTokens.id, row.t.id));
  }
  return {
    user: { id: row.u.id, name: row.u.name, email: row.u.email, emailVerified: row.u.emailVerified, isAdmin: row.u.role === "admin" },
    tokenId: row.t.id,
    scope: row.t.scope,
  };
}

/** The token in an Authorization header, or null when there is no bearer token. */
export function bearerToken(header: string | null | undefined): string | null {
  const m = /^Bearer\s+(\S+)\s*$/i.exec(header ?? "");
  return m ? m[1]! : null;
}
