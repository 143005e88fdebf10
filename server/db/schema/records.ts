/**
 * Records, QC runs and processing outputs (issue 5).
 *
 * Records layout — one row per (dataset, platform, time) per range of versions:
 * - `dataset_id`, `platform` ('' for a single-platform file, else the file's platform id), `time` (timestamptz, UTC).
 * - `valid_from` / `valid_to`: version NUMBERS of the dataset. A row belongs to version V when
 *   `valid_from <= V and (valid_to is null or valid_to > V)`. A new version writes only what changed (its own rows
 *   with `valid_from = N`) and closes replaced rows by setting `valid_to = N`; unchanged rows are shared, so storage
 *   grows with what changes between versions. Builds run in one transaction, so a version's rows are invisible to
 *   every reader until it is complete; readers must also only read versions whose state is ready or later.
 * - One column per canonical variable, named by its key (shared/vocabulary.ts): measured variables in canonical
 *   units (`wind_speed`, `air_temperature` in K, …) and derived ones (`surface_downward_eastward_stress`, …),
 *   `double precision`, NULL where the build had no such variable (a NaN value is stored as NaN).
 * - Every variable's aggregate QC flag in one `flags` bytea, a byte per variable at its place in FLAG_ORDER
 *   (server/db/record-flags.ts: 1 pass, 2 not evaluated, 3 suspect, 4 fail, 9 missing, 0 none); SQL reads one with
 *   `record_flag(flags, i)` and readers name it `<key>_qc` in what they return.
 * Rows of released (also superseded or retracted) versions can never change: a trigger refuses any UPDATE or DELETE
 * that would alter what such a version sees (drizzle/*_records_released_guard.sql).
 * - Partitioned by range on (dataset_id, valid_from), one partition per version that wrote rows, named
 *   `records_<dataset hex>_<N>` (drizzle/0016_records_partition_per_build.sql, which Drizzle's schema cannot express):
 *   a build creates its partition, COPYs into it and attaches it in its transaction (server/db/record-partitions.ts).
 *   Read and update through `records`; a dataset's queries prune to that dataset's partitions.
 */
import { sql } from "drizzle-orm";
import {
  bigint,
  boolean,
  check,
  customType,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  smallint,
  text,
  timestamp,
  uuid,
} from "drizzle-orm/pg-core";
import { derivedVariables, measuredVariables } from "@shared/vocabulary";
import { qcRunStates } from "@shared/schemas/versions";
import { user } from "./auth";
import { versions } from "./datasets";
import { deployments, projects } from "./projects";

/** One value column per variable, then the packed flags (migrations 0013 and 0014). */
const variableColumns = () => {
  const cols: Record<string, ReturnType<typeof doublePrecision>> = {};
  for (const v of [...measuredVariables, ...derivedVariables]) cols[v] = doublePrecision(v);
  return cols;
};

const bytea = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => "bytea" });

export const records = pgTable(
  "records",
  {
    // No foreign key: a per-row RI check would cost PostgreSQL more than the rest of a 2.7 M-row COPY. Only the
    // worker inserts records, under a lock on the version row; a trigger on datasets refuses deleting a dataset
    // that still has records (drizzle/*_records_dataset_guard.sql).
    datasetId: uuid().notNull(),
    platform: text().notNull().default(""),
    time: timestamp({ withTimezone: true }).notNull(),
    validFrom: integer().notNull(),
    validTo: integer(),
    ...variableColumns(),
    flags: bytea().notNull(),
  },
  (t) => [
    primaryKey({ name: "records_pkey", columns: [t.datasetId, t.platform, t.time, t.validFrom] }),
    check("records_valid_range_check", sql`${t.validTo} is null or ${t.validTo} > ${t.validFrom}`),
  ],
);

export const qcRunState = pgEnum("qc_run_state", qcRunStates);

/**
 * The processing run behind a version (one per version; a retry reuses it and counts the attempt): settings
 * snapshot, progress, counts per test and flag, timings and the error a person can act on.
 */
export const qcRuns = pgTable(
  "qc_runs",
  {
    versionId: uuid().primaryKey().references(() => versions.id, { onDelete: "cascade" }),
    state: qcRunState().notNull().default("queued"),
    mode: text().notNull(),
    attempt: integer().notNull().default(0),
    jobId: text(),
    stage: text().notNull().default("queued"),
    columnMap: jsonb().notNull(),
    /** The request's overrides, and the resolved settings the run used (the snapshot). */
    settingsOverrides: jsonb(),
    settings: jsonb(),
    provenance: jsonb(),
    bytesTotal: bigint({ mode: "number" }).notNull().default(0),
    bytesDone: bigint({ mode: "number" }).notNull().default(0),
    rowsDone: bigint({ mode: "number" }).notNull().default(0),
    rowsPerS: doublePrecision(),
    /** Engine counts: flags per variable, [suspect, fail] per test and variable, notes; plus rows written/replaced/dropped. */
    counts: jsonb(),
    warnings: jsonb(),
    /** { message, line?, column? } written for users. */
    error: jsonb(),
    timings: jsonb(),
    cancelRequested: boolean().notNull().default(false),
    heartbeatAt: timestamp({ withTimezone: true }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp({ withTimezone: true }),
    finishedAt: timestamp({ withTimezone: true }),
  },
  (t) => [
    check("qc_runs_mode_check", sql`${t.mode} in ('replace', 'append')`),
    index("qc_runs_state_idx").on(t.state),
  ],
);

/** QC setting overrides per deployment (merged over the defaults, then under a build's own overrides). */
export const deploymentQcSettings = pgTable("deployment_qc_settings", {
  deploymentId: uuid().primaryKey().references(() => deployments.id, { onDelete: "cascade" }),
  settings: jsonb().notNull(),
  updatedBy: text().references(() => user.id, { onDelete: "set null" }),
  updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
});

/**
 * Pre-aggregated plot series of a version: for one platform, variable and bucket size, arrays over fixed buckets
 * starting at `t0` (epoch seconds): bucket i covers [t0 + i·step, t0 + (i+1)·step). Empty buckets have n = 0 and
 * NaN min/max/mean. Worst flag = the highest QC flag in the bucket.
 */
export const plotSeries = pgTable(
  "plot_series",
  {
    versionId: uuid().notNull().references(() => versions.id, { onDelete: "cascade" }),
    platform: text().notNull().default(""),
    variable: text().notNull(),
    stepS: integer().notNull(),
    t0: doublePrecision().notNull(),
    /** Bucket arrays as bytea, big-endian elements: float4 min, max, mean; int4 n; int2 worst flag (server/db/plot-arrays.ts). */
    min: bytea().notNull(),
    max: bytea().notNull(),
    mean: bytea().notNull(),
    n: bytea().notNull(),
    worstFlag: bytea().notNull(),
  },
  (t) => [primaryKey({ name: "plot_series_pkey", columns: [t.versionId, t.platform, t.variable, t.stepS] }), check("plot_series_step_check", sql`${t.stepS} > 0`)],
);

/**
 * Array diagnostics of a project's moorings (wind-stress curl, Ekman pumping, Sverdrup transport) at common time
 * steps t0 + i·step; NaN where fewer than three platforms had valid stress. One row per project (latest run).
 */
export const arrayDiagnosticSeries = pgTable(
  "array_diagnostic_series",
  {
    projectId: uuid().primaryKey().references(() => projects.id, { onDelete: "cascade" }),
    computedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    /** [{ datasetId, versionId, number, title, latitude, longitude }] */
    inputs: jsonb().notNull(),
    stepS: integer().notNull(),
    t0: doublePrecision().notNull(),
    curl: doublePrecision().array().notNull(),
    ekmanPumping: doublePrecision().array().notNull(),
    sverdrup: doublePrecision().array().notNull(),
    used: smallint().array().notNull(),
    /** Why nothing could be computed, for people; null when series exist. */
    note: text(),
  },
  (t) => [check("array_diagnostic_series_step_check", sql`${t.stepS} > 0`)],
);
