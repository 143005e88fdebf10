import type { Db } from "../db/client";
import { auditLog } from "../db/schema";

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

export interface AuditEntry {
  actorId: string | null;
  action: string;
  entityType: string;
  entityId: string;
  fromState?: string | null;
  toState?: string | null;
  reason?: string | null;
  details?: unknown;
}

/** Appends one audit row inside the caller's transaction, so the change and its record land together. */
export async function writeAudit(tx: Tx | Db, entry: AuditEntry) {
  await tx.insert(auditLog).values({
    actorId: entry.actorId,
    action: entry.action,
    entityType: entry.entityType,
    entityId: entry.entityId,
    fromState: entry.fromState ?? null,
    toState: entry.toState ?? null,
    reason: entry.reason ?? null,
    details: entry.details ?? null,
  });
}
