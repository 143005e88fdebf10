import { sql } from "drizzle-orm";
import { check, index, integer, pgTable, primaryKey, smallint, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { user } from "./auth";
import { datasets, versions } from "./datasets";

/**
 * Notes on a stretch of a dataset's records (issue 7). An annotation with a manual flag sets `<variable>_qc` for its
 * variables over [start_time, end_time] in the dataset's editable version and in every later build
 * (server/services/annotations.ts `applyManualFlags`). Annotations belong to the dataset, not to one version, so
 * they carry over; `version_id` records the version someone was looking at when they wrote it.
 */
export const annotations = pgTable(
  "annotations",
  {
    id: uuid().primaryKey().defaultRandom(),
    datasetId: uuid().notNull().references(() => datasets.id, { onDelete: "cascade" }),
    versionId: uuid().references(() => versions.id, { onDelete: "set null" }),
    /** A fleet member's platform id, or null for every platform of the dataset. */
    platform: text(),
    startTime: timestamp({ withTimezone: true }).notNull(),
    endTime: timestamp({ withTimezone: true }).notNull(),
    variables: text().array().notNull(),
    note: text().notNull().default(""),
    /** Manual QC flag (1 pass, 3 suspect, 4 fail) or null for a note only. */
    flag: smallint(),
    reason: text(),
    createdBy: text().references(() => user.id, { onDelete: "set null" }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    updatedBy: text().references(() => user.id, { onDelete: "set null" }),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("annotations_dataset_time_idx").on(t.datasetId, t.startTime),
    check("annotations_range_check", sql`${t.endTime} >= ${t.startTime}`),
    check("annotations_variables_check", sql`cardinality(${t.variables}) >= 1`),
    check("annotations_flag_check", sql`${t.flag} is null or ${t.flag} in (1, 3, 4)`),
    check("annotations_reason_check", sql`${t.flag} is null or length(btrim(coalesce(${t.reason}, ''))) >= 3`),
  ],
);

/**
 * The automatic flag a manual flag replaced, per record, variable and version, so that editing or deleting the
 * annotation can give the record its automatic flag back. Written once per (record, variable, version).
 */
export const manualFlagOriginals = pgTable(
  "manual_flag_originals",
  {
    datasetId: uuid().notNull().references(() => datasets.id, { onDelete: "cascade" }),
    versionNumber: integer().notNull(),
    platform: text().notNull(),
    time: timestamp({ withTimezone: true }).notNull(),
    variable: text().notNull(),
    flag: smallint().notNull(),
  },
  (t) => [primaryKey({ name: "manual_flag_originals_pkey", columns: [t.datasetId, t.platform, t.variable, t.time, t.versionNumber] })],
);
