import { sql } from "drizzle-orm";
import { bigint, check, index, integer, jsonb, pgEnum, pgTable, text, timestamp, unique, uuid } from "drizzle-orm/pg-core";
import { versionStates } from "@shared/schemas/datasets";
import { user } from "./auth";
import { deployments, projects } from "./projects";

export const versionState = pgEnum("version_state", versionStates);

export const datasets = pgTable(
  "datasets",
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid().notNull().references(() => projects.id, { onDelete: "restrict" }),
    deploymentId: uuid().references(() => deployments.id, { onDelete: "restrict" }),
    title: text().notNull(),
    description: text(),
    licence: text().notNull().default("CC-BY-4.0"),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [unique("datasets_project_title_key").on(t.projectId, t.title), index("datasets_deployment_idx").on(t.deploymentId)],
);

/** A file received through the resumable upload endpoint. Stored once, never changed. */
export const uploads = pgTable(
  "uploads",
  {
    id: uuid().primaryKey().defaultRandom(),
    datasetId: uuid().notNull().references(() => datasets.id, { onDelete: "restrict" }),
    uploaderId: text().notNull().references(() => user.id, { onDelete: "restrict" }),
    /** The client's file name: metadata only, never part of a storage path. */
    originalName: text().notNull(),
    /** Storage key built by server/lib/file-store.ts from server ids. */
    storageKey: text().notNull().unique(),
    sizeBytes: bigint({ mode: "number" }).notNull(),
    sha256: text().notNull(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    check("uploads_size_check", sql`${t.sizeBytes} >= 0`),
    check("uploads_sha256_check", sql`${t.sha256} ~ '^[0-9a-f]{64}$'`),
    index("uploads_dataset_idx").on(t.datasetId),
  ],
);

export const versions = pgTable(
  "versions",
  {
    id: uuid().primaryKey().defaultRandom(),
    datasetId: uuid().notNull().references(() => datasets.id, { onDelete: "restrict" }),
    number: integer().notNull(),
    state: versionState().notNull().default("draft"),
    /** The version this one was built from (append), or null (built from an upload alone). */
    baseVersionId: uuid(),
    uploadId: uuid().references(() => uploads.id, { onDelete: "restrict" }),
    createdBy: text().references(() => user.id, { onDelete: "set null" }),
    summary: jsonb(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    stateChangedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [unique("versions_dataset_number_key").on(t.datasetId, t.number), check("versions_number_check", sql`${t.number} >= 1`)],
);

/** Append-only record of every state change: who, when, what, from, to, why. */
export const auditLog = pgTable(
  "audit_log",
  {
    id: bigint({ mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    at: timestamp({ withTimezone: true }).notNull().defaultNow(),
    actorId: text(),
    action: text().notNull(),
    entityType: text().notNull(),
    entityId: text().notNull(),
    fromState: text(),
    toState: text(),
    reason: text(),
    details: jsonb(),
    ip: text(),
  },
  (t) => [index("audit_log_entity_idx").on(t.entityType, t.entityId)],
);

/** Messages captured by the local fake SMTP server, readable by admins. */
export const mailMessages = pgTable("mail_messages", {
  id: uuid().primaryKey().defaultRandom(),
  from: text().notNull(),
  to: text().array().notNull(),
  subject: text().notNull(),
  text: text().notNull(),
  raw: text().notNull(),
  receivedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
});
