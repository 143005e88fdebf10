import { z } from "zod";
import { isoInstantSchema } from "./common";

/**
 * Exploring a version's records: plot windows (min/max per bucket), records pages (keyset on time), the QC report
 * and the map track. Times are ISO 8601 in UTC on the wire; plot arrays carry epoch seconds for speed.
 */

const variableList = z
  .string()
  .trim()
  .min(1, "Name at least one variable")
  .transform((s) => s.split(",").map((x) => x.trim()).filter(Boolean))
  .pipe(z.array(z.string().regex(/^[a-z0-9_]+$/, "Variable names are lower-case keys such as wind_speed")).min(1, "Name at least one variable").max(24, "At most 24 variables per request"));

// GET /api/versions/:id/plot
export const plotQuerySchema = z
  .object({
    variables: variableList,
    from: isoInstantSchema.optional(),
    to: isoInstantSchema.optional(),
    buckets: z.coerce.number().int("buckets must be a whole number").min(10, "buckets must be at least 10").max(5000, "buckets must be at most 5000").default(2000),
    platform: z.string().max(200).optional(),
  })
  .refine((q) => !q.from || !q.to || Date.parse(q.to) > Date.parse(q.from), { message: "to must be after from", path: ["to"] });
export type PlotQuery = z.input<typeof plotQuerySchema>;

export const plotSeriesSchema = z.object({
  variable: z.string(),
  platform: z.string(),
  unit: z.string(),
  /** Bucket start times, epoch seconds; bucket i covers [t[i], t[i] + stepS). Empty buckets are left out. */
  t: z.array(z.number()),
  min: z.array(z.number()),
  max: z.array(z.number()),
  mean: z.array(z.number()),
  n: z.array(z.number()),
  /** The highest QC flag among the bucket's values (1 pass, 2 not evaluated, 3 suspect, 4 fail). */
  worstFlag: z.array(z.number()),
});
export type PlotSeries = z.infer<typeof plotSeriesSchema>;

export const plotWindowSchema = z.object({
  versionId: z.string(),
  from: z.string(),
  to: z.string(),
  /** Bucket width, s. */
  stepS: z.number(),
  /** Where the buckets came from: pre-aggregated series (coarse windows) or the records themselves (fine ones). */
  source: z.enum(["series", "records"]),
  /** The version's full time span, for the zoom-out button. */
  extent: z.object({ start: z.string().nullable(), end: z.string().nullable() }),
  platforms: z.array(z.string()),
  series: z.array(plotSeriesSchema),
});
export type PlotWindow = z.infer<typeof plotWindowSchema>;

// GET /api/versions/:id/records
export const recordsQuerySchema = z
  .object({
    variables: variableList.optional(),
    from: isoInstantSchema.optional(),
    to: isoInstantSchema.optional(),
    platform: z.string().max(200).optional(),
    order: z.enum(["asc", "desc"], { message: "order must be asc or desc" }).default("asc"),
    /**
     * Sort by a variable's value instead of time (ties by time, then platform), in `order`; records without a value
     * of that variable are left out while sorting by it. Omit to sort by time.
     */
    sort: z.string().trim().min(1).max(100).optional(),
    /** Keyset cursor from the previous page's `nextCursor`. */
    cursor: z.string().max(400).optional(),
    limit: z.coerce.number().int().min(1, "limit must be at least 1").max(2000, "limit must be at most 2000").default(500),
    /** Only rows where at least one of the shown variables carries one of these flags, e.g. 3,4. */
    flags: z
      .string()
      .transform((s) => s.split(",").filter(Boolean).map(Number))
      .pipe(z.array(z.number().int().refine((f) => [1, 2, 3, 4, 9].includes(f), "Flags are 1, 2, 3, 4 or 9")).max(5, "At most 5 flags"))
      .optional(),
  })
  .refine((q) => !q.from || !q.to || Date.parse(q.to) >= Date.parse(q.from), { message: "to must not be before from", path: ["to"] });
export type RecordsQuery = z.input<typeof recordsQuerySchema>;

export const recordColumnSchema = z.object({ key: z.string(), label: z.string(), unit: z.string(), derived: z.boolean() });
export type RecordColumn = z.infer<typeof recordColumnSchema>;

export const recordRowSchema = z.object({
  time: z.string(),
  platform: z.string(),
  /** Values by variable key (null where the value is missing or NaN). */
  values: z.record(z.string(), z.number().nullable()),
  flags: z.record(z.string(), z.number().nullable()),
});
export type RecordRow = z.infer<typeof recordRowSchema>;

export const recordsPageSchema = z.object({
  columns: z.array(recordColumnSchema),
  items: z.array(recordRowSchema),
  nextCursor: z.string().nullable(),
});
export type RecordsPage = z.infer<typeof recordsPageSchema>;

export const qcStretchSchema = z.object({
  variable: z.string(),
  platform: z.string(),
  from: z.string(),
  to: z.string(),
  worstFlag: z.number(),
  /** Minutes in the stretch holding at least one suspect or failed value. */
  flaggedMinutes: z.number(),
});
export type QcStretch = z.infer<typeof qcStretchSchema>;

// GET /api/versions/:id/qc-report
export const qcReportSchema = z.object({
  versionId: z.string(),
  tests: z.array(z.string()),
  variables: z.array(z.object({ key: z.string(), label: z.string(), unit: z.string(), derived: z.boolean(), flags: z.array(z.number()) })),
  /** [suspect, fail] per variable and test, from the QC run. */
  testCounts: z.record(z.string(), z.record(z.string(), z.tuple([z.number(), z.number()]))),
  timeline: z.object({ t0: z.number(), stepS: z.number(), length: z.number(), rows: z.array(z.object({ variable: z.string(), worstFlag: z.array(z.number()) })) }).nullable(),
  stretches: z.array(qcStretchSchema),
  manualFlags: z.number(),
});
export type QcReport = z.infer<typeof qcReportSchema>;

// GET /api/versions/:id/track
export const trackSchema = z.object({
  kind: z.enum(["mooring", "drifter"]),
  deployment: z.object({ latitude: z.number().nullable(), longitude: z.number().nullable(), watchCircleM: z.number().nullable(), name: z.string() }).nullable(),
  tracks: z.array(
    z.object({
      platform: z.string(),
      /** [epoch s, longitude, latitude, speed m s-1 or null, worst position flag] per hour. */
      points: z.array(z.tuple([z.number(), z.number(), z.number(), z.number().nullable(), z.number()])),
    }),
  ),
});
export type Track = z.infer<typeof trackSchema>;
