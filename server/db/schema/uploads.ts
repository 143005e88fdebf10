import { sql } from "drizzle-orm";
import { bigint, check, index, integer, jsonb, pgTable, text, timestamp, unique, uuid } from "drizzle-orm/pg-core";
import { user } from "./auth";
import { uploads } from "./datasets";
import { platforms } from "./projects";

/**
 * Column maps saved per platform. Each save is a new revision (never updated), so next month's upload starts
 * from the latest one and the history shows who changed what.
 */
export const columnMaps = pgTable(
  "column_maps",
  {
    id: uuid().primaryKey().defaultRandom(),
    platformId: uuid().notNull().references(() => platforms.id, { onDelete: "restrict" }),
    revision: integer().notNull(),
    /** A map valid under shared/schemas/column-map.ts (checked before insert). */
    map: jsonb().notNull(),
    note: text(),
    /** The upload the map was drawn up for, if any. */
    uploadId: uuid().references(() => uploads.id, { onDelete: "set null" }),
    createdBy: text().references(() => user.id, { onDelete: "set null" }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [unique("column_maps_platform_revision_key").on(t.platformId, t.revision), check("column_maps_revision_check", sql`${t.revision} >= 1`)],
);

/**
 * What the server found when it read an upload: encoding, dialect, and problems with line and column. The upload
 * row itself never changes; this is written once at finish and completed by the full-file scan.
 */
export const uploadInspections = pgTable(
  "upload_inspections",
  {
    uploadId: uuid().primaryKey().references(() => uploads.id, { onDelete: "cascade" }),
    /** "utf-8" or "utf-8-bom". Other encodings are refused before an upload is recorded. */
    encoding: text().notNull(),
    /** Sniffed dialect: delimiter, decimal mark, header row, line ending. */
    dialect: jsonb().notNull(),
    /** checking: the full-file scan runs; ok / warnings: usable; unusable: the scan found a blocking problem. */
    status: text().notNull().default("checking"),
    dataLineCount: bigint({ mode: "number" }),
    findings: jsonb(),
    checkedAt: timestamp({ withTimezone: true }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    check("upload_inspections_status_check", sql`${t.status} in ('checking', 'ok', 'warnings', 'unusable')`),
    check("upload_inspections_encoding_check", sql`${t.encoding} in ('utf-8', 'utf-8-bom')`),
    index("upload_inspections_status_idx").on(t.status),
  ],
);
