import { z } from "zod";
import { idSchema, isoInstantSchema } from "./common";
import { releaseSchema } from "./curation";
import { versionSummarySchema } from "./datasets";
import { platformKinds } from "./platforms";

export const catalogueSorts = ["released", "title", "start", "end"] as const;
export type CatalogueSort = (typeof catalogueSorts)[number];

const num = (what: string, min: number, max: number) =>
  z.coerce.number({ message: `${what} must be a number` }).min(min, `${what} is at least ${min}`).max(max, `${what} is at most ${max}`);

/** Catalogue search: every filter is optional; the URL of the catalogue page carries the same names. */
export const catalogueSearchSchema = z
  .object({
    /** Words matched against title, project, platform and variable names. */
    q: z.string().trim().max(200, "Search text is at most 200 characters").optional(),
    kind: z.enum(platformKinds, { message: "kind must be mooring or drifter" }).optional(),
    /** Area as west,south,east,north in degrees (west > east crosses the antimeridian). */
    bbox: z
      .string()
      .trim()
      .optional()
      .transform((s, ctx) => {
        if (!s) return undefined;
        const p = s.split(",").map(Number);
        if (p.length !== 4 || p.some((x) => !Number.isFinite(x))) {
          ctx.addIssue({ code: "custom", message: "bbox is west,south,east,north in degrees, e.g. -30,40,-25,43" });
          return z.NEVER;
        }
        const [west, south, east, north] = p as [number, number, number, number];
        if (Math.abs(west) > 180 || Math.abs(east) > 180) ctx.addIssue({ code: "custom", message: "bbox longitudes are between -180 and 180" });
        if (south < -90 || north > 90 || south > north) ctx.addIssue({ code: "custom", message: "bbox latitudes are between -90 and 90, south before north" });
        return { west, south, east, north };
      }),
    /** Datasets whose time coverage overlaps [from, to]. */
    from: isoInstantSchema.optional(),
    to: isoInstantSchema.optional(),
    /** Comma-separated variable names: datasets holding all of them. */
    variables: z
      .string()
      .trim()
      .max(2000, "At most 2000 characters")
      .optional()
      .transform((s) => (s ? s.split(",").map((x) => x.trim()).filter(Boolean) : undefined)),
    sort: z.enum(catalogueSorts, { message: "sort must be released, title, start or end" }).default("released"),
    page: num("page", 1, 10000).int("page must be a whole number").default(1),
    pageSize: num("pageSize", 1, 100).int("pageSize must be a whole number").default(20),
  })
  .refine((q) => !q.from || !q.to || Date.parse(q.from) <= Date.parse(q.to), { message: "from must not be after to", path: ["to"] });
export type CatalogueSearch = z.output<typeof catalogueSearchSchema>;

export const boundsSchema = z.object({ west: z.number(), south: z.number(), east: z.number(), north: z.number() });
export type Bounds = z.infer<typeof boundsSchema>;

/** One released dataset as the catalogue lists it. */
export const catalogueItemSchema = z.object({
  id: idSchema,
  title: z.string(),
  projectName: z.string(),
  platformName: z.string().nullable(),
  platformKind: z.enum(platformKinds).nullable(),
  latitude: z.number().nullable(),
  longitude: z.number().nullable(),
  /** Where the data lie: positions from the records when the version has them, else the deployment's point. */
  bounds: boundsSchema.nullable(),
  startTime: z.string().nullable(),
  endTime: z.string().nullable(),
  variables: z.array(z.string()),
  releasedVersion: z.number(),
  releasedVersionId: idSchema,
  releaseId: idSchema,
  releaseNumber: z.number(),
  releasedAt: z.string(),
  licence: z.string(),
  rows: z.number().nullable(),
});
export type CatalogueItem = z.infer<typeof catalogueItemSchema>;

export const cataloguePageSchema = z.object({
  items: z.array(catalogueItemSchema),
  total: z.number(),
  page: z.number(),
  pageSize: z.number(),
});
export type CataloguePage = z.infer<typeof cataloguePageSchema>;

export const catalogueVariableSchema = z.object({
  name: z.string(),
  standardName: z.string().nullable(),
  longName: z.string(),
  units: z.string(),
  count: z.number().nullable(),
  min: z.number().nullable(),
  max: z.number().nullable(),
  /** Count per flag: index = flag value (1 pass, 2 not evaluated, 3 suspect, 4 fail, 9 missing). */
  flags: z.array(z.number()),
});
export type CatalogueVariable = z.infer<typeof catalogueVariableSchema>;

/** The citation of a release in three forms to copy. */
export const citationFormsSchema = z.object({ text: z.string(), bibtex: z.string(), ris: z.string() });
export type CitationForms = z.infer<typeof citationFormsSchema>;

/** A dataset's landing page. */
export const datasetLandingSchema = z.object({
  id: idSchema,
  title: z.string(),
  description: z.string().nullable(),
  projectName: z.string(),
  platformName: z.string().nullable(),
  platformKind: z.enum(platformKinds).nullable(),
  latitude: z.number().nullable(),
  longitude: z.number().nullable(),
  bounds: boundsSchema.nullable(),
  licence: z.string(),
  /** The version the page describes: the current release, or (for members) the newest built version. */
  version: versionSummarySchema.nullable(),
  startTime: z.string().nullable(),
  endTime: z.string().nullable(),
  rows: z.number().nullable(),
  variables: z.array(catalogueVariableSchema),
  versions: z.array(versionSummarySchema),
  releases: z.array(releaseSchema),
  citation: citationFormsSchema.nullable(),
});
export type DatasetLanding = z.infer<typeof datasetLandingSchema>;
