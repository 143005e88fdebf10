import { z } from "zod";
import { columnMapSchema } from "./column-map";
import { idSchema } from "./common";
import { versionStates } from "./datasets";

/** States of the processing run behind a version. */
export const qcRunStates = ["queued", "running", "succeeded", "failed", "cancelled"] as const;
export type QcRunState = (typeof qcRunStates)[number];

/** Stages a build goes through, in order; the version page shows them. */
export const buildStages = ["queued", "reading", "summarising", "done"] as const;
export type BuildStage = (typeof buildStages)[number];

export const buildModes = ["replace", "append"] as const;
export type BuildMode = (typeof buildModes)[number];

/** States in which a version's records are frozen forever (enforced by a database trigger). */
export const frozenVersionStates = ["released", "superseded", "retracted"] as const;
/** States in which a version's records are complete and may serve as the base of an append. */
export const builtVersionStates = ["ready", "in_review", "changes_requested", "rejected", "approved", "released", "superseded"] as const;

// POST /api/datasets/:id/versions
export const createVersionInputSchema = z.object({
  uploadId: idSchema,
  columnMap: columnMapSchema,
  mode: z.enum(buildModes, { message: "mode must be replace or append" }),
  /** Overrides merged over the deployment's QC settings (see shared/schemas/qc-settings.ts). */
  qcSettings: z.record(z.string(), z.unknown()).optional(),
});
export type CreateVersionInput = z.input<typeof createVersionInputSchema>;

export const createdVersionSchema = z.object({ id: idSchema, number: z.number().int(), state: z.enum(versionStates) });
export type CreatedVersion = z.infer<typeof createdVersionSchema>;

export const buildErrorSchema = z.object({ message: z.string(), line: z.number().optional(), column: z.string().optional() });
export type BuildError = z.infer<typeof buildErrorSchema>;

export const versionProgressSchema = z.object({
  versionId: idSchema,
  versionState: z.enum(versionStates),
  runState: z.enum(qcRunStates),
  stage: z.enum(buildStages),
  attempt: z.number().int(),
  /** 0–100. */
  percent: z.number(),
  rowsDone: z.number(),
  rowsPerS: z.number().nullable(),
  bytesDone: z.number(),
  bytesTotal: z.number(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
  error: buildErrorSchema.nullable(),
  cancelRequested: z.boolean(),
});
export type VersionProgress = z.infer<typeof versionProgressSchema>;

const flagCounts = z.array(z.number());
export const variableStatsSchema = z.object({
  variable: z.string(),
  unit: z.string(),
  count: z.number(),
  min: z.number().nullable(),
  max: z.number().nullable(),
  mean: z.number().nullable(),
  std: z.number().nullable(),
  /** Count per flag value, index = flag (1, 2, 3, 4, 9). */
  flags: flagCounts,
});
export type VariableStats = z.infer<typeof variableStatsSchema>;

export const versionSummaryDataSchema = z.object({
  rows: z.number(),
  platforms: z.array(z.object({ id: z.string(), rows: z.number(), start: z.string().nullable(), end: z.string().nullable() })),
  start: z.string().nullable(),
  end: z.string().nullable(),
  intervalS: z.number().nullable(),
  /** Gaps longer than the gap factor × interval, longest first (at most 50). */
  gaps: z.array(z.object({ platform: z.string(), from: z.string(), to: z.string(), seconds: z.number() })),
  gapCount: z.number(),
  /** Share of expected samples present, 0–1. */
  coverage: z.number().nullable(),
  variables: z.array(variableStatsSchema),
});
export type VersionSummaryData = z.infer<typeof versionSummaryDataSchema>;

export const qcRunReportSchema = z.object({
  mode: z.enum(buildModes),
  attempt: z.number(),
  settings: z.unknown(),
  provenance: z.unknown(),
  /** Records this build read and wrote. */
  rowsRead: z.number(),
  rowsWritten: z.number(),
  /** Rows of the base version replaced because the upload covers their time. */
  rowsReplaced: z.number(),
  /** Records without a usable time (unreadable, repeated or out of order): not stored. */
  rowsDropped: z.number(),
  /** Per variable, per test: [suspect, fail] among this build's records. */
  testCounts: z.record(z.string(), z.record(z.string(), z.tuple([z.number(), z.number()]))),
  /** Per variable: count per flag value among this build's records. */
  flagCounts: z.record(z.string(), flagCounts),
  warnings: z.array(z.object({ line: z.number(), column: z.string().optional(), message: z.string() })),
  warningCount: z.number(),
  timings: z.record(z.string(), z.number()),
});
export type QcRunReport = z.infer<typeof qcRunReportSchema>;

export const versionDetailSchema = z.object({
  id: idSchema,
  number: z.number(),
  state: z.enum(versionStates),
  datasetId: idSchema,
  datasetTitle: z.string(),
  projectId: idSchema,
  uploadId: idSchema.nullable(),
  uploadName: z.string().nullable(),
  baseVersionNumber: z.number().nullable(),
  createdAt: z.string(),
  createdBy: z.string().nullable(),
  /** Caller's rights, so the page can hide controls (the server decides). */
  canControl: z.boolean(),
  progress: versionProgressSchema.nullable(),
  summary: versionSummaryDataSchema.nullable(),
  qcRun: qcRunReportSchema.nullable(),
});
export type VersionDetail = z.infer<typeof versionDetailSchema>;

export const arrayDiagnosticsSchema = z.object({
  projectId: idSchema,
  computedAt: z.string().nullable(),
  /** The moorings and drifters that took part, at their mean position over the hours they did. */
  inputs: z.array(
    z.object({
      datasetId: z.string(),
      versionNumber: z.number(),
      title: z.string(),
      latitude: z.number(),
      longitude: z.number(),
      /** "drifter" with its id in the fleet, or a mooring (older results have neither). */
      kind: z.enum(["mooring", "drifter"]).optional(),
      platform: z.string().optional(),
    }),
  ),
  stepS: z.number(),
  /** Epoch seconds of each step, and the series (null where not computable). */
  time: z.array(z.number()),
  curl: z.array(z.number().nullable()),
  ekmanPumping: z.array(z.number().nullable()),
  sverdrup: z.array(z.number().nullable()),
  used: z.array(z.number()),
  note: z.string().nullable(),
  caution: z.string(),
});
export type ArrayDiagnostics = z.infer<typeof arrayDiagnosticsSchema>;

/** Query of GET /api/v1/projects/:id/array-diagnostics. */
export const arrayDiagnosticsQuerySchema = z.object({
  format: z.enum(["json", "csv"], { message: "format must be json or csv" }).default("json").describe("`csv`: every step, one line each, in SI units"),
});
