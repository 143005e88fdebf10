import { z } from "zod";
import { isoInstantSchema } from "./common";

export const downloadFormats = ["csv", "datapackage", "parquet"] as const;
export type DownloadFormat = (typeof downloadFormats)[number];

/**
 * Minimum QC level of a subset. pass: only values flagged 1 (pass). pass_suspect: values flagged 1 (pass),
 * 2 (not evaluated) or 3 (suspect) — everything that did not fail. Values below the level are left empty
 * (their flag stays, so the reason is visible); rows with no value left are dropped.
 */
export const qcLevels = ["all", "pass", "pass_suspect"] as const;
export type QcLevel = (typeof qcLevels)[number];
export const qcLevelFlags: Record<Exclude<QcLevel, "all">, readonly number[]> = { pass: [1], pass_suspect: [1, 2, 3] };

/** The QC flag scheme of every `<name>_qc` column (values and meanings, as in the handbook). */
export const qcFlagMeanings = [
  { value: 1, meaning: "pass" },
  { value: 2, meaning: "not_evaluated" },
  { value: 3, meaning: "suspect" },
  { value: 4, meaning: "fail" },
  { value: 9, meaning: "missing" },
] as const;

export const downloadQuerySchema = z
  .object({
    format: z.enum(downloadFormats, { message: "format must be csv, datapackage or parquet" }).default("csv"),
    /** Start of the time range (inclusive), ISO 8601 with a zone. */
    from: isoInstantSchema.optional(),
    /** End of the time range (exclusive), ISO 8601 with a zone. */
    to: isoInstantSchema.optional(),
    /** Comma-separated variable names; all of the version's variables when omitted. */
    variables: z
      .string()
      .trim()
      .max(4000, "At most 4000 characters")
      .optional()
      .transform((s) => (s ? [...new Set(s.split(",").map((x) => x.trim()).filter(Boolean))] : undefined)),
    qc: z.enum(qcLevels, { message: "qc must be all, pass or pass_suspect" }).default("all"),
    /** Keep every n-th record of each platform (1 = all). */
    every: z.coerce.number({ message: "every must be a whole number" }).int("every must be a whole number").min(1, "every is at least 1").max(100000, "every is at most 100000").default(1),
  })
  .refine((q) => !q.from || !q.to || Date.parse(q.from) < Date.parse(q.to), { message: "from must be before to", path: ["to"] });
export type DownloadQuery = z.output<typeof downloadQuerySchema>;

export const releaseFileCheckSchema = z.object({
  name: z.string(),
  format: z.string(),
  sizeBytes: z.number(),
  expectedSha256: z.string(),
  actualSha256: z.string().nullable(),
  ok: z.boolean(),
  /** Why the check failed, for people (file missing, size or checksum differs). */
  problem: z.string().nullable(),
});
export type ReleaseFileCheck = z.infer<typeof releaseFileCheckSchema>;

export const releaseVerificationSchema = z.object({
  releaseId: z.string(),
  checkedAt: z.string(),
  ok: z.boolean(),
  items: z.array(releaseFileCheckSchema),
});
export type ReleaseVerification = z.infer<typeof releaseVerificationSchema>;
