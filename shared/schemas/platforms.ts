import { z } from "zod";
import { blankable, clearable, clearableNumber, clearableText, idSchema, isoInstantSchema, optionalNumber, optionalText } from "./common";

export const platformKinds = ["mooring", "drifter"] as const;
export type PlatformKind = (typeof platformKinds)[number];

export const createPlatformInputSchema = z.object({
  name: z.string().trim().min(2, "Name needs at least 2 characters").max(120, "At most 120 characters"),
  kind: z.enum(platformKinds, { message: "Choose mooring or drifter" }),
  /** WMO identifier: 5 or 7 digits. */
  wmoNumber: blankable(z.string().trim().regex(/^(\d{5}|\d{7})$/, "WMO number has 5 or 7 digits")),
  description: optionalText(4000),
});
export type CreatePlatformInput = z.infer<typeof createPlatformInputSchema>;
/** Edits: fields left out stay; a blank WMO number or description clears it. */
export const updatePlatformInputSchema = z.object({
  name: createPlatformInputSchema.shape.name.optional(),
  kind: createPlatformInputSchema.shape.kind.optional(),
  wmoNumber: clearable(z.string().trim().regex(/^(\d{5}|\d{7})$/, "WMO number has 5 or 7 digits")),
  description: clearableText(4000),
});
export type UpdatePlatformInput = z.infer<typeof updatePlatformInputSchema>;

export const platformSchema = z.object({
  id: idSchema,
  projectId: idSchema,
  name: z.string(),
  kind: z.enum(platformKinds),
  wmoNumber: z.string().nullable(),
  description: z.string().nullable(),
  createdAt: z.string(),
  deploymentCount: z.number().optional(),
});
export type Platform = z.infer<typeof platformSchema>;

const lat = z.number({ message: "Latitude must be a number" }).min(-90, "Latitude must be between −90 and 90").max(90, "Latitude must be between −90 and 90");
const lon = z.number({ message: "Longitude must be a number" }).min(-180, "Longitude must be between −180 and 180").max(180, "Longitude must be between −180 and 180");
const positive = (label: string) => z.number({ message: `${label} must be a number` }).positive(`${label} must be greater than 0`);

const bearing = z.number({ message: "Bearing must be a number" }).min(0, "Bearing must be in [0, 360)").lt(360, "Bearing must be in [0, 360)");
const name = z.string().trim().min(2, "Name needs at least 2 characters").max(120, "At most 120 characters");

/** The optional numbers of a deployment and their checks. */
const numberChecks = {
  /** Nominal anchor position (moorings); drifters may leave it empty. */
  latitude: lat,
  longitude: lon,
  waterDepthM: positive("Water depth"),
  watchCircleRadiusM: positive("Watch-circle radius"),
  anemometerHeightM: positive("Anemometer height"),
  currentMeterDepthM: positive("Current-meter depth"),
  /** Bearing (degrees true) of the normal pointing from land out to sea; for the upwelling index. */
  coastlineOffshoreBearingDeg: bearing,
};
type NumberKey = keyof typeof numberChecks;
const eachNumber = <R>(f: (check: z.ZodNumber) => R) =>
  Object.fromEntries(Object.entries(numberChecks).map(([k, check]) => [k, f(check)])) as Record<NumberKey, R>;

const deploymentFields = z.object({
  name,
  startTime: isoInstantSchema,
  endTime: blankable(isoInstantSchema),
  ...eachNumber((check) => optionalNumber(check)),
  notes: optionalText(4000),
});

/** Edits: fields left out stay; a blank optional field (end, position, heights, bearing, notes) clears it. */
const deploymentEdits = z.object({
  name: name.optional(),
  startTime: isoInstantSchema.optional(),
  endTime: clearable(isoInstantSchema),
  ...eachNumber((check) => clearableNumber(check)),
  notes: clearableText(4000),
});

const checkDeployment = (d: { startTime?: string; endTime?: string | null; latitude?: number | null; longitude?: number | null }, ctx: z.RefinementCtx) => {
  if (d.startTime && d.endTime && Date.parse(d.endTime) <= Date.parse(d.startTime)) {
    ctx.addIssue({ code: "custom", path: ["endTime"], message: "End must be after start" });
  }
  // Both or neither: given together, cleared together (null), or both left as they are.
  const given = (x: number | null | undefined) => (x === undefined ? "absent" : x === null ? "cleared" : "set");
  if (given(d.latitude) !== given(d.longitude)) {
    const missing = given(d.latitude) === "set" ? "longitude" : "latitude";
    ctx.addIssue({ code: "custom", path: [missing], message: "Give both latitude and longitude, or neither" });
  }
};

export const createDeploymentInputSchema = deploymentFields.superRefine(checkDeployment);
export type CreateDeploymentInput = z.infer<typeof createDeploymentInputSchema>;
export const updateDeploymentInputSchema = deploymentEdits.superRefine(checkDeployment);
export type UpdateDeploymentInput = z.infer<typeof updateDeploymentInputSchema>;

export const deploymentSchema = z.object({
  id: idSchema,
  platformId: idSchema,
  projectId: idSchema,
  name: z.string(),
  startTime: z.string(),
  endTime: z.string().nullable(),
  latitude: z.number().nullable(),
  longitude: z.number().nullable(),
  waterDepthM: z.number().nullable(),
  watchCircleRadiusM: z.number().nullable(),
  anemometerHeightM: z.number().nullable(),
  currentMeterDepthM: z.number().nullable(),
  coastlineOffshoreBearingDeg: z.number().nullable(),
  notes: z.string().nullable(),
  createdAt: z.string(),
});
export type Deployment = z.infer<typeof deploymentSchema>;
