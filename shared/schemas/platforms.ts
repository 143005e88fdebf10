import { z } from "zod";
import { blankable, idSchema, isoInstantSchema, optionalNumber, optionalText } from "./common";

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
export const updatePlatformInputSchema = createPlatformInputSchema.partial();
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

const deploymentFields = z.object({
  name: z.string().trim().min(2, "Name needs at least 2 characters").max(120, "At most 120 characters"),
  startTime: isoInstantSchema,
  endTime: blankable(isoInstantSchema),
  /** Nominal anchor position (moorings); drifters may leave it empty. */
  latitude: optionalNumber(lat),
  longitude: optionalNumber(lon),
  waterDepthM: optionalNumber(positive("Water depth")),
  watchCircleRadiusM: optionalNumber(positive("Watch-circle radius")),
  anemometerHeightM: optionalNumber(positive("Anemometer height")),
  currentMeterDepthM: optionalNumber(positive("Current-meter depth")),
  /** Bearing (degrees true) of the normal pointing from land out to sea; for the upwelling index. */
  coastlineOffshoreBearingDeg: optionalNumber(
    z.number({ message: "Bearing must be a number" }).min(0, "Bearing must be in [0, 360)").lt(360, "Bearing must be in [0, 360)"),
  ),
  notes: optionalText(4000),
});

const checkDeployment = (d: { startTime?: string; endTime?: string; latitude?: number; longitude?: number }, ctx: z.RefinementCtx) => {
  if (d.startTime && d.endTime && Date.parse(d.endTime) <= Date.parse(d.startTime)) {
    ctx.addIssue({ code: "custom", path: ["endTime"], message: "End must be after start" });
  }
  if ((d.latitude === undefined) !== (d.longitude === undefined)) {
    ctx.addIssue({ code: "custom", path: [d.latitude === undefined ? "latitude" : "longitude"], message: "Give both latitude and longitude, or neither" });
  }
};

export const createDeploymentInputSchema = deploymentFields.superRefine(checkDeployment);
export type CreateDeploymentInput = z.infer<typeof createDeploymentInputSchema>;
export const updateDeploymentInputSchema = deploymentFields.partial().superRefine(checkDeployment);
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
