import { z } from "zod";
import { blankable, clearable, clearableText, idSchema, optionalText } from "./common";
import { platformKinds } from "./platforms";

export const versionStates = [
  "draft",
  "processing",
  "ready",
  "failed",
  "in_review",
  "changes_requested",
  "rejected",
  "approved",
  "released",
  "superseded",
  "retracted",
] as const;
export type VersionState = (typeof versionStates)[number];

export const licences = ["CC-BY-4.0", "CC-BY-SA-4.0", "CC0-1.0", "ODC-BY-1.0"] as const;

export const createDatasetInputSchema = z.object({
  title: z.string().trim().min(3, "Title needs at least 3 characters").max(200, "At most 200 characters"),
  /** The deployment this series comes from; omit for a drifter-fleet dataset. */
  deploymentId: blankable(idSchema),
  description: optionalText(8000),
  licence: z.enum(licences, { message: "Choose a listed licence" }).default("CC-BY-4.0"),
});
export type CreateDatasetInput = z.input<typeof createDatasetInputSchema>;
/**
 * Edits: fields left out stay; a blank description clears it. The deployment can change (or be cleared) only until
 * the first version is built: built versions took their position and sensor heights from it.
 */
export const updateDatasetInputSchema = z.object({
  title: createDatasetInputSchema.shape.title.optional(),
  deploymentId: clearable(idSchema),
  description: clearableText(8000),
  licence: z.enum(licences, { message: "Choose a listed licence" }).optional(),
});
export type UpdateDatasetInput = z.infer<typeof updateDatasetInputSchema>;

export const versionSummarySchema = z.object({
  id: idSchema,
  number: z.number(),
  state: z.enum(versionStates),
  createdAt: z.string(),
  createdBy: z.string().nullable(),
});
export type VersionSummary = z.infer<typeof versionSummarySchema>;

export const datasetSchema = z.object({
  id: idSchema,
  projectId: idSchema,
  projectName: z.string(),
  deploymentId: idSchema.nullable(),
  deploymentName: z.string().nullable(),
  platformId: idSchema.nullable(),
  platformName: z.string().nullable(),
  platformKind: z.enum(platformKinds).nullable(),
  title: z.string(),
  description: z.string().nullable(),
  licence: z.string(),
  createdAt: z.string(),
  versions: z.array(versionSummarySchema),
  latestRelease: versionSummarySchema.nullable(),
});
export type Dataset = z.infer<typeof datasetSchema>;

/** One entry of the public catalogue: datasets with at least one released version. */
export const catalogueEntrySchema = z.object({
  id: idSchema,
  title: z.string(),
  projectName: z.string(),
  platformName: z.string().nullable(),
  platformKind: z.enum(platformKinds).nullable(),
  latitude: z.number().nullable(),
  longitude: z.number().nullable(),
  startTime: z.string().nullable(),
  endTime: z.string().nullable(),
  releasedVersion: z.number(),
  releasedAt: z.string(),
  licence: z.string(),
});
export type CatalogueEntry = z.infer<typeof catalogueEntrySchema>;

export const catalogueQuerySchema = z.object({
  q: z.string().trim().max(200, "Search text is at most 200 characters").optional(),
  kind: z.enum(platformKinds, { message: "kind must be mooring or drifter" }).optional(),
});

/** A version waiting for a curator's decision. */
export const reviewQueueItemSchema = z.object({
  versionId: idSchema,
  datasetId: idSchema,
  datasetTitle: z.string(),
  projectName: z.string(),
  number: z.number(),
  submittedAt: z.string(),
  submittedBy: z.string(),
});
export type ReviewQueueItem = z.infer<typeof reviewQueueItemSchema>;
