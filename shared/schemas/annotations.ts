import { z } from "zod";
import { idSchema, isoInstantSchema } from "./common";

/** Manual flags a person may set: pass, suspect, fail (QC flag scheme values). */
export const manualFlagValues = [1, 3, 4] as const;

const variables = z
  .array(z.string().regex(/^[a-z0-9_]+$/, "Variable names are lower-case keys such as wind_speed"), { message: "Choose at least one variable" })
  .min(1, "Choose at least one variable")
  .max(40, "At most 40 variables");

const base = {
  from: isoInstantSchema,
  to: isoInstantSchema,
  variables,
  note: z.string().trim().max(4000, "At most 4000 characters").default(""),
  flag: z
    .union([z.literal(1), z.literal(3), z.literal(4), z.null()], { message: "The flag must be 1 (pass), 3 (suspect) or 4 (fail)" })
    .optional()
    .transform((f) => f ?? null),
  reason: z.string().trim().max(2000, "At most 2000 characters").optional(),
};

const reasonRule = (a: { flag?: number | null; reason?: string }) => !a.flag || (a.reason?.length ?? 0) >= 3;
const reasonIssue = { message: "Give a reason (at least 3 characters) for the manual flag", path: ["reason"] };
const orderRule = (a: { from?: string; to?: string }) => !a.from || !a.to || Date.parse(a.to) >= Date.parse(a.from);
const orderIssue = { message: "to must not be before from", path: ["to"] };

// POST /api/datasets/:id/annotations
export const createAnnotationInputSchema = z
  .object({ ...base, versionId: idSchema.optional(), platform: z.string().max(200).optional() })
  .refine(orderRule, orderIssue)
  .refine(reasonRule, reasonIssue);
export type CreateAnnotationInput = z.input<typeof createAnnotationInputSchema>;

// PATCH /api/annotations/:id
export const updateAnnotationInputSchema = z
  .object({
    from: base.from.optional(),
    to: base.to.optional(),
    variables: variables.optional(),
    note: z.string().trim().max(4000, "At most 4000 characters").optional(),
    flag: z.union([z.literal(1), z.literal(3), z.literal(4), z.null()], { message: "The flag must be 1 (pass), 3 (suspect) or 4 (fail), or null" }).optional(),
    reason: base.reason,
  })
  .refine(orderRule, orderIssue);
export type UpdateAnnotationInput = z.input<typeof updateAnnotationInputSchema>;

export const annotationSchema = z.object({
  id: idSchema,
  datasetId: idSchema,
  versionId: idSchema.nullable(),
  platform: z.string().nullable(),
  from: z.string(),
  to: z.string(),
  variables: z.array(z.string()),
  note: z.string(),
  flag: z.number().nullable(),
  reason: z.string().nullable(),
  createdBy: z.string().nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type Annotation = z.infer<typeof annotationSchema>;

/** What a change did to the records of the dataset's editable version (null when none is editable now). */
export const flagApplicationSchema = z
  .object({ versionId: idSchema, versionNumber: z.number(), rowsChanged: z.number() })
  .nullable();

export const annotationResultSchema = z.object({ annotation: annotationSchema, applied: flagApplicationSchema, note: z.string().nullable() });
export type AnnotationResult = z.infer<typeof annotationResultSchema>;
