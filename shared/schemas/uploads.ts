import { z } from "zod";
import { dialectSchema, delimiters } from "../sniff/dialect";
import { idSchema } from "./common";

export const inspectionStatuses = ["checking", "ok", "warnings", "unusable"] as const;
export type InspectionStatus = (typeof inspectionStatuses)[number];

export const findingSchema = z.object({
  severity: z.enum(["error", "warning"]),
  code: z.string(),
  message: z.string(),
  count: z.number(),
  lines: z.array(z.number()),
  column: z.string().optional(),
});
export type FindingView = z.infer<typeof findingSchema>;

/** One recorded upload, as listed on the dataset page. */
export const uploadSummarySchema = z.object({
  id: idSchema,
  datasetId: idSchema,
  originalName: z.string(),
  sizeBytes: z.number(),
  sha256: z.string(),
  uploaderName: z.string().nullable(),
  createdAt: z.string(),
  status: z.enum(inspectionStatuses).nullable(),
});
export type UploadSummary = z.infer<typeof uploadSummarySchema>;

/** GET /api/datasets/:id/uploads: the uploads, the dataset's platform and its latest saved column map. */
export const datasetUploadsSchema = z.object({
  items: z.array(uploadSummarySchema),
  platformId: idSchema.nullable(),
  savedMap: z.unknown().nullable(),
});
export type DatasetUploads = z.infer<typeof datasetUploadsSchema>;

/** Dialect overrides for the preview, from query parameters (all optional; the sniffed dialect fills the rest). */
export const previewQuerySchema = z.object({
  delimiter: z
    .enum(["comma", "semicolon", "tab", "space"], { message: "delimiter is comma, semicolon, tab or space" })
    .optional()
    .transform((d) => (d === undefined ? undefined : ({ comma: ",", semicolon: ";", tab: "\t", space: " " } as const)[d])),
  decimalMark: z.enum(["point", "comma"], { message: "decimalMark is point or comma" }).optional().transform((d) => (d === undefined ? undefined : d === "point" ? "." : ",")),
  headerRow: z.coerce.number({ message: "headerRow is a line number" }).int("headerRow is a whole line number").min(0, "headerRow is 0 (none) or a line number").max(50, "headerRow is at most 50").optional(),
  skipRows: z.coerce.number({ message: "skipRows is a number of lines" }).int("skipRows is a whole number").min(0, "skipRows is 0 or more").max(50, "skipRows is at most 50").optional(),
});
export type PreviewQuery = { delimiter?: "comma" | "semicolon" | "tab" | "space"; decimalMark?: "point" | "comma"; headerRow?: number; skipRows?: number };
export const delimiterNames: Record<(typeof delimiters)[number], "comma" | "semicolon" | "tab" | "space"> = { ",": "comma", ";": "semicolon", "\t": "tab", " ": "space" };

/** An upload with what the server found in it, the first data rows and a suggested column map. */
export const uploadDetailSchema = uploadSummarySchema.extend({
  projectId: idSchema,
  platformId: idSchema.nullable(),
  platformName: z.string().nullable(),
  encoding: z.string().nullable(),
  /** The sniffed dialect (what the server detected). */
  detected: dialectSchema.nullable(),
  /** The dialect the preview below was read with (detected, or the query's overrides). */
  dialect: dialectSchema.nullable(),
  dataLineCount: z.number().nullable(),
  findings: z.array(findingSchema),
  preview: z.object({
    header: z.array(z.string()).nullable(),
    rows: z.array(z.array(z.string())),
    lines: z.array(z.number()),
  }),
  suggestion: z.object({ map: z.unknown(), source: z.enum(["platform", "headers"]), notes: z.array(z.string()) }).nullable(),
});
export type UploadDetail = z.infer<typeof uploadDetailSchema>;

export const createColumnMapInputSchema = z.object({
  /** Checked with shared/sniff's checkColumnMap (shared column-map schema plus completeness rules). */
  map: z.unknown(),
  note: z.string().trim().max(500, "At most 500 characters").optional(),
  uploadId: idSchema.optional(),
});
export type CreateColumnMapInput = z.input<typeof createColumnMapInputSchema>;

export const columnMapRevisionSchema = z.object({
  id: idSchema,
  platformId: idSchema,
  revision: z.number(),
  map: z.unknown(),
  note: z.string().nullable(),
  uploadId: idSchema.nullable(),
  createdByName: z.string().nullable(),
  createdAt: z.string(),
});
export type ColumnMapRevision = z.infer<typeof columnMapRevisionSchema>;
