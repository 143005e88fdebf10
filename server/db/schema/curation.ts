import { sql } from "drizzle-orm";
import { bigint, check, index, integer, pgEnum, pgTable, primaryKey, text, timestamp, unique, uuid } from "drizzle-orm/pg-core";
import { notificationKinds, reviewDecisions } from "@shared/schemas/curation";
import { user } from "./auth";
import { datasets, versions } from "./datasets";

export const reviewDecision = pgEnum("review_decision", reviewDecisions);
export const notificationKind = pgEnum("notification_kind", notificationKinds);

/** A curator's decision on a version. Reject and changes-requested carry a reason (checked here, not only in the API). */
export const reviews = pgTable(
  "reviews",
  {
    id: uuid().primaryKey().defaultRandom(),
    versionId: uuid().notNull().references(() => versions.id, { onDelete: "restrict" }),
    reviewerId: text().references(() => user.id, { onDelete: "set null" }),
    decision: reviewDecision().notNull(),
    reason: text(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("reviews_version_idx").on(t.versionId),
    check("reviews_reason_check", sql`${t.decision} = 'approved' or length(trim(${t.reason})) >= 3`),
  ],
);

/** The discussion thread on a version. */
export const versionComments = pgTable(
  "version_comments",
  {
    id: uuid().primaryKey().defaultRandom(),
    versionId: uuid().notNull().references(() => versions.id, { onDelete: "restrict" }),
    authorId: text().references(() => user.id, { onDelete: "set null" }),
    body: text().notNull(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("version_comments_version_idx").on(t.versionId, t.createdAt), check("version_comments_body_check", sql`length(trim(${t.body})) between 1 and 8000`)],
);

/**
 * A release: the citable, immutable record of a released version. Triggers (migration
 * curation_immutability) refuse every UPDATE except the one-time retraction and every DELETE.
 */
export const releases = pgTable(
  "releases",
  {
    id: uuid().primaryKey().defaultRandom(),
    versionId: uuid().notNull().references(() => versions.id, { onDelete: "restrict" }),
    datasetId: uuid().notNull().references(() => datasets.id, { onDelete: "restrict" }),
    /** 1, 2, … per dataset. */
    releaseNumber: integer().notNull(),
    versionNumber: integer().notNull(),
    releasedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    releasedBy: text().references(() => user.id, { onDelete: "set null" }),
    projectName: text().notNull(),
    datasetTitle: text().notNull(),
    authors: text().array().notNull(),
    citation: text().notNull(),
    stableUrl: text().notNull(),
    licence: text().notNull(),
    notes: text(),
    retractedAt: timestamp({ withTimezone: true }),
    retractedBy: text().references(() => user.id, { onDelete: "set null" }),
    retractionReason: text(),
  },
  (t) => [
    unique("releases_version_key").on(t.versionId),
    unique("releases_dataset_number_key").on(t.datasetId, t.releaseNumber),
    check("releases_number_check", sql`${t.releaseNumber} >= 1`),
    check("releases_authors_check", sql`cardinality(${t.authors}) >= 1`),
    check(
      "releases_retraction_check",
      sql`(${t.retractedAt} is null and ${t.retractionReason} is null) or (${t.retractedAt} is not null and length(trim(${t.retractionReason})) >= 3)`,
    ),
  ],
);

/** Every file offered for download from a release, with its SHA-256. Append-only (trigger). */
export const releaseFiles = pgTable(
  "release_files",
  {
    id: uuid().primaryKey().defaultRandom(),
    releaseId: uuid().notNull().references(() => releases.id, { onDelete: "restrict" }),
    /** e.g. csv, datapackage, parquet. */
    format: text().notNull(),
    name: text().notNull(),
    sizeBytes: bigint({ mode: "number" }).notNull(),
    sha256: text().notNull(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    unique("release_files_release_name_key").on(t.releaseId, t.name),
    check("release_files_size_check", sql`${t.sizeBytes} >= 0`),
    check("release_files_sha256_check", sql`${t.sha256} ~ '^[0-9a-f]{64}$'`),
  ],
);

/** In-app notices; the same events also go out by e-mail. */
export const notifications = pgTable(
  "notifications",
  {
    id: uuid().primaryKey().defaultRandom(),
    userId: text().notNull().references(() => user.id, { onDelete: "cascade" }),
    kind: notificationKind().notNull(),
    title: text().notNull(),
    body: text().notNull(),
    /** A path inside the app (the e-mail carries the same path on PUBLIC_URL). */
    link: text().notNull(),
    versionId: uuid().references(() => versions.id, { onDelete: "cascade" }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    readAt: timestamp({ withTimezone: true }),
  },
  (t) => [index("notifications_user_idx").on(t.userId, t.createdAt), check("notifications_link_check", sql`${t.link} like '/%'`)],
);

/** People who want to hear about new releases of a dataset. */
export const datasetFollows = pgTable(
  "dataset_follows",
  {
    datasetId: uuid().notNull().references(() => datasets.id, { onDelete: "cascade" }),
    userId: text().notNull().references(() => user.id, { onDelete: "cascade" }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.datasetId, t.userId] }), index("dataset_follows_user_idx").on(t.userId)],
);
