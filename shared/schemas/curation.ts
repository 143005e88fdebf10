import { z } from "zod";
import { idSchema } from "./common";
import { licences, versionStates } from "./datasets";

/** A curator's decision; each one names the state it moves the version to. */
export const reviewDecisions = ["approved", "rejected", "changes_requested"] as const;
export type ReviewDecision = (typeof reviewDecisions)[number];

export const notificationKinds = [
  "version_submitted",
  "version_approved",
  "version_rejected",
  "changes_requested",
  "version_released",
  "release_retracted",
  "comment_added",
] as const;
export type NotificationKind = (typeof notificationKinds)[number];

/** Transitions after processing, by action: from which states, to which state. */
export const curationActions = {
  submit: { from: ["ready", "changes_requested"], to: "in_review" },
  approve: { from: ["in_review"], to: "approved" },
  reject: { from: ["in_review"], to: "rejected" },
  requestChanges: { from: ["in_review"], to: "changes_requested" },
  release: { from: ["approved"], to: "released" },
  retract: { from: ["released", "superseded"], to: "retracted" },
} as const satisfies Record<string, { from: readonly (typeof versionStates)[number][]; to: (typeof versionStates)[number] }>;
export type CurationAction = keyof typeof curationActions;

const reasonText = z
  .string({ message: "Give a reason" })
  .trim()
  .min(3, "Give a reason of at least 3 characters")
  .max(4000, "At most 4000 characters");

export const submitInputSchema = z.object({
  note: z.string().trim().max(4000, "At most 4000 characters").optional(),
});
export type SubmitInput = z.infer<typeof submitInputSchema>;

export const approveInputSchema = z.object({
  reason: z.string().trim().max(4000, "At most 4000 characters").optional(),
});
export type ApproveInput = z.infer<typeof approveInputSchema>;

/** Reject and request changes need a reason the uploader can act on. */
export const reasonInputSchema = z.object({ reason: reasonText });
export type ReasonInput = z.infer<typeof reasonInputSchema>;

export const releaseInputSchema = z.object({
  licence: z.enum(licences, { message: "Choose a listed licence" }).optional(),
  notes: z.string().trim().max(8000, "At most 8000 characters").optional(),
  /** Names as they should appear in the citation; defaults to the version's builder and the project's curators. */
  authors: z
    .array(z.string().trim().min(1, "An author name cannot be blank").max(200, "At most 200 characters"))
    .min(1, "Name at least one author")
    .max(100, "At most 100 authors")
    .optional(),
});
export type ReleaseInput = z.infer<typeof releaseInputSchema>;

export const retractInputSchema = reasonInputSchema;

export const commentInputSchema = z.object({
  body: z.string({ message: "Write a comment" }).trim().min(1, "Write a comment").max(8000, "At most 8000 characters"),
});
export type CommentInput = z.infer<typeof commentInputSchema>;

export const commentSchema = z.object({
  id: idSchema,
  versionId: idSchema,
  authorId: z.string().nullable(),
  authorName: z.string(),
  body: z.string(),
  createdAt: z.string(),
});
export type Comment = z.infer<typeof commentSchema>;

export const historyEntrySchema = z.object({
  at: z.string(),
  actorName: z.string().nullable(),
  action: z.string(),
  fromState: z.string().nullable(),
  toState: z.string().nullable(),
  reason: z.string().nullable(),
});
export type HistoryEntry = z.infer<typeof historyEntrySchema>;

/** What the caller may do next, and why not when they may not (shown beside disabled controls). */
export const versionPermissionsSchema = z.object({
  canSubmit: z.boolean(),
  canDecide: z.boolean(),
  canRelease: z.boolean(),
  canRetract: z.boolean(),
  canComment: z.boolean(),
  /** Set when the caller is a curator but built or uploaded this version. */
  fourEyesBlocked: z.boolean(),
});
export type VersionPermissions = z.infer<typeof versionPermissionsSchema>;

export const releaseFileSchema = z.object({
  format: z.string(),
  name: z.string(),
  sizeBytes: z.number(),
  sha256: z.string(),
  createdAt: z.string(),
});
export type ReleaseFile = z.infer<typeof releaseFileSchema>;

export const releaseSchema = z.object({
  id: idSchema,
  datasetId: idSchema,
  versionId: idSchema,
  projectName: z.string(),
  datasetTitle: z.string(),
  versionNumber: z.number(),
  releaseNumber: z.number(),
  releasedAt: z.string(),
  releasedByName: z.string().nullable(),
  authors: z.array(z.string()),
  citation: z.string(),
  stableUrl: z.string(),
  licence: z.string(),
  notes: z.string().nullable(),
  files: z.array(releaseFileSchema),
  retracted: z
    .object({ at: z.string(), reason: z.string(), byName: z.string().nullable() })
    .nullable(),
  versionState: z.enum(versionStates),
  /** Whether the caller may fetch the data (always for live releases; members only once retracted). */
  dataAvailable: z.boolean(),
});
export type Release = z.infer<typeof releaseSchema>;

export const versionReviewSchema = z.object({
  version: z.object({
    id: idSchema,
    datasetId: idSchema,
    datasetTitle: z.string(),
    projectId: idSchema,
    projectName: z.string(),
    number: z.number(),
    state: z.enum(versionStates),
    createdAt: z.string(),
    stateChangedAt: z.string(),
    createdByName: z.string().nullable(),
    uploaderName: z.string().nullable(),
    uploadName: z.string().nullable(),
    summary: z.unknown(),
  }),
  previous: z.object({ id: idSchema, number: z.number(), state: z.enum(versionStates), summary: z.unknown() }).nullable(),
  history: z.array(historyEntrySchema),
  /** The processing run's report (qc_runs.counts): flag counts per variable, [suspect, fail] per test and variable. */
  qc: z.unknown(),
  /** The longest flagged stretches (hourly buckets whose worst flag is suspect or fail), longest first. */
  stretches: z.array(
    z.object({ platform: z.string(), variable: z.string(), from: z.string(), to: z.string(), hours: z.number(), worstFlag: z.number() }),
  ),
  releaseId: idSchema.nullable(),
  permissions: versionPermissionsSchema,
});
export type VersionReview = z.infer<typeof versionReviewSchema>;

export const notificationSchema = z.object({
  id: idSchema,
  kind: z.enum(notificationKinds),
  title: z.string(),
  body: z.string(),
  /** Path inside the app, e.g. /review/<id>. */
  link: z.string(),
  createdAt: z.string(),
  readAt: z.string().nullable(),
});
export type Notification = z.infer<typeof notificationSchema>;

export const notificationListSchema = z.object({ items: z.array(notificationSchema), unreadCount: z.number() });
export type NotificationList = z.infer<typeof notificationListSchema>;

export const markReadInputSchema = z.union([
  z.object({ ids: z.array(idSchema).min(1, "Name at least one notification").max(500, "At most 500 at once") }),
  z.object({ all: z.literal(true, { message: "all must be true" }) }),
]);
export type MarkReadInput = z.infer<typeof markReadInputSchema>;

export const followStateSchema = z.object({ following: z.boolean() });

/** How a version differs from the one before it (records compared row by row in PostgreSQL). */
export const versionComparisonSchema = z.object({
  versionId: idSchema,
  number: z.number(),
  previous: z.object({ id: idSchema, number: z.number() }).nullable(),
  rowsAdded: z.number(),
  rowsRemoved: z.number(),
  /** Rows present in both whose values or flags differ. */
  rowsChanged: z.number(),
  /** Per variable: rows present in both whose flag differs, and whose value differs. */
  variables: z.array(z.object({ variable: z.string(), flagsChanged: z.number(), valuesChanged: z.number() })),
});
export type VersionComparison = z.infer<typeof versionComparisonSchema>;
