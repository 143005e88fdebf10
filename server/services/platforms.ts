import { asc, count, eq } from "drizzle-orm";
import type {
  CreateDeploymentInput,
  CreatePlatformInput,
  Deployment,
  Platform,
  UpdateDeploymentInput,
  UpdatePlatformInput,
} from "@shared/schemas/platforms";
import {
  defaultQcSettings,
  resolveQcSettings,
  unknownSettingPaths,
  type DeploymentQcSettings,
  type QcSettingsInput,
  type UpdateDeploymentQcSettingsInput,
} from "@shared/schemas/qc-settings";
import { db } from "../db/client";
import { deploymentQcSettings, deployments, platforms, user as users } from "../db/schema";
import { AppError, conflict, notFound, zodDetails } from "../lib/errors";
import type { SessionUser } from "../middleware/require-session";
import { assertProjectAccess } from "./access";
import { writeAudit } from "./audit";
import { isUniqueViolation } from "./projects";

type PlatformRow = typeof platforms.$inferSelect;
type DeploymentRow = typeof deployments.$inferSelect;

const toPlatform = (p: PlatformRow, deploymentCount?: number): Platform => ({
  id: p.id,
  projectId: p.projectId,
  name: p.name,
  kind: p.kind,
  wmoNumber: p.wmoNumber,
  description: p.description,
  createdAt: p.createdAt.toISOString(),
  ...(deploymentCount !== undefined ? { deploymentCount } : {}),
});

const toDeployment = (d: DeploymentRow, projectId: string): Deployment => ({
  id: d.id,
  platformId: d.platformId,
  projectId,
  name: d.name,
  startTime: d.startTime.toISOString(),
  endTime: d.endTime ? d.endTime.toISOString() : null,
  latitude: d.latitude,
  longitude: d.longitude,
  waterDepthM: d.waterDepthM,
  watchCircleRadiusM: d.watchCircleRadiusM,
  anemometerHeightM: d.anemometerHeightM,
  currentMeterDepthM: d.currentMeterDepthM,
  coastlineOffshoreBearingDeg: d.coastlineOffshoreBearingDeg,
  notes: d.notes,
  createdAt: d.createdAt.toISOString(),
});

/** Loads a platform and checks the caller's access to its project (ids from the client are never trusted). */
async function loadPlatform(user: SessionUser, platformId: string, need: "read" | "contribute") {
  const [p] = await db.select().from(platforms).where(eq(platforms.id, platformId));
  if (!p) throw notFound("Platform");
  await assertProjectAccess(user, p.projectId, need);
  return p;
}

async function loadDeployment(user: SessionUser, deploymentId: string, need: "read" | "contribute") {
  const [row] = await db
    .select({ d: deployments, projectId: platforms.projectId })
    .from(deployments)
    .innerJoin(platforms, eq(platforms.id, deployments.platformId))
    .where(eq(deployments.id, deploymentId));
  if (!row) throw notFound("Deployment");
  await assertProjectAccess(user, row.projectId, need);
  return row;
}

export async function listPlatforms(user: SessionUser, projectId: string): Promise<Platform[]> {
  await assertProjectAccess(user, projectId, "read");
  const rows = await db
    .select({ p: platforms, n: count(deployments.id) })
    .from(platforms)
    .leftJoin(deployments, eq(deployments.platformId, platforms.id))
    .where(eq(platforms.projectId, projectId))
    .groupBy(platforms.id)
    .orderBy(asc(platforms.name));
  return rows.map((r) => toPlatform(r.p, r.n));
}

const platformConflict = () => conflict("This project already has a platform with that name", { name: ["Already used in this project"] });

export async function createPlatform(user: SessionUser, projectId: string, input: CreatePlatformInput): Promise<Platform> {
  await assertProjectAccess(user, projectId, "contribute");
  try {
    return await db.transaction(async (tx) => {
      const [p] = await tx.insert(platforms).values({ ...input, projectId }).returning();
      await writeAudit(tx, { actorId: user.id, action: "platform.create", entityType: "platform", entityId: p!.id, details: input });
      return toPlatform(p!, 0);
    });
  } catch (err) {
    if (isUniqueViolation(err)) throw platformConflict();
    throw err;
  }
}

export async function getPlatform(user: SessionUser, platformId: string): Promise<Platform> {
  const p = await loadPlatform(user, platformId, "read");
  const [n] = await db.select({ n: count() }).from(deployments).where(eq(deployments.platformId, platformId));
  return toPlatform(p, n!.n);
}

export async function updatePlatform(user: SessionUser, platformId: string, input: UpdatePlatformInput): Promise<Platform> {
  await loadPlatform(user, platformId, "contribute");
  try {
    await db.transaction(async (tx) => {
      await tx.update(platforms).set(input).where(eq(platforms.id, platformId));
      await writeAudit(tx, { actorId: user.id, action: "platform.update", entityType: "platform", entityId: platformId, details: input });
    });
  } catch (err) {
    if (isUniqueViolation(err)) throw platformConflict();
    throw err;
  }
  return getPlatform(user, platformId);
}

export async function listDeployments(user: SessionUser, platformId: string): Promise<Deployment[]> {
  const p = await loadPlatform(user, platformId, "read");
  const rows = await db.select().from(deployments).where(eq(deployments.platformId, platformId)).orderBy(asc(deployments.startTime));
  return rows.map((d) => toDeployment(d, p.projectId));
}

const deploymentValues = (input: UpdateDeploymentInput) => ({
  ...input,
  startTime: input.startTime ? new Date(input.startTime) : undefined,
  endTime: input.endTime ? new Date(input.endTime) : input.endTime === undefined ? undefined : null,
});

const deploymentConflict = () => conflict("This platform already has a deployment with that name", { name: ["Already used on this platform"] });

export async function createDeployment(user: SessionUser, platformId: string, input: CreateDeploymentInput): Promise<Deployment> {
  const p = await loadPlatform(user, platformId, "contribute");
  try {
    return await db.transaction(async (tx) => {
      const v = deploymentValues(input);
      const [d] = await tx
        .insert(deployments)
        .values({ ...v, name: input.name, platformId, startTime: v.startTime!, endTime: v.endTime ?? null })
        .returning();
      await writeAudit(tx, { actorId: user.id, action: "deployment.create", entityType: "deployment", entityId: d!.id, details: input });
      return toDeployment(d!, p.projectId);
    });
  } catch (err) {
    if (isUniqueViolation(err)) throw deploymentConflict();
    throw err;
  }
}

export async function getDeployment(user: SessionUser, deploymentId: string): Promise<Deployment> {
  const row = await loadDeployment(user, deploymentId, "read");
  return toDeployment(row.d, row.projectId);
}

export async function updateDeployment(user: SessionUser, deploymentId: string, input: UpdateDeploymentInput): Promise<Deployment> {
  const row = await loadDeployment(user, deploymentId, "contribute");
  const merged = { ...row.d, ...deploymentValues(input) };
  if (merged.endTime && merged.startTime && merged.endTime <= merged.startTime) {
    throw conflict("End must be after start", { endTime: ["End must be after start"] });
  }
  try {
    await db.transaction(async (tx) => {
      await tx.update(deployments).set(deploymentValues(input)).where(eq(deployments.id, deploymentId));
      await writeAudit(tx, { actorId: user.id, action: "deployment.update", entityType: "deployment", entityId: deploymentId, details: input });
    });
  } catch (err) {
    if (isUniqueViolation(err)) throw deploymentConflict();
    throw err;
  }
  return getDeployment(user, deploymentId);
}

/**
 * A deployment's QC settings: the overrides stored for it and what its next build resolves them to (defaults from
 * shared/schemas/qc-settings.ts underneath; a build's own overrides still go on top). Members of its project read.
 */
export async function getDeploymentQcSettings(user: SessionUser, deploymentId: string): Promise<DeploymentQcSettings> {
  await loadDeployment(user, deploymentId, "read");
  const [row] = await db
    .select({ settings: deploymentQcSettings.settings, updatedAt: deploymentQcSettings.updatedAt, updatedByName: users.name })
    .from(deploymentQcSettings)
    .leftJoin(users, eq(users.id, deploymentQcSettings.updatedBy))
    .where(eq(deploymentQcSettings.deploymentId, deploymentId));
  const overrides = (row?.settings ?? {}) as Record<string, unknown>;
  const resolved = resolveQcSettings(overrides as QcSettingsInput);
  if (!resolved.success) throw conflict("The stored QC settings of this deployment are no longer valid; save them again", zodDetails(resolved.error));
  return {
    deploymentId,
    overrides,
    settings: resolved.data,
    defaults: defaultQcSettings(),
    updatedAt: row?.updatedAt ? row.updatedAt.toISOString() : null,
    updatedByName: row?.updatedByName ?? null,
  };
}

/**
 * Replaces a deployment's QC overrides (an empty object goes back to the defaults). Contributors and curators of
 * its project may; a setting the schema does not have, or a value it refuses, is named by its path. Builds already
 * made keep the settings snapshot they used; the next build uses these.
 */
export async function updateDeploymentQcSettings(user: SessionUser, deploymentId: string, input: UpdateDeploymentQcSettingsInput): Promise<DeploymentQcSettings> {
  await loadDeployment(user, deploymentId, "contribute");
  const unknown = unknownSettingPaths(input.overrides);
  if (unknown.length)
    throw new AppError("validation_failed", "Some settings are not ones Tauline knows", 400, Object.fromEntries(unknown.map((p) => [`overrides.${p}`, ["Not a QC setting; check the spelling"]])));
  const resolved = resolveQcSettings(input.overrides as QcSettingsInput);
  if (!resolved.success) {
    const details = zodDetails(resolved.error);
    throw new AppError("validation_failed", "Some settings need attention", 400, Object.fromEntries(Object.entries(details).map(([k, v]) => [`overrides.${k}`, v])));
  }
  await db.transaction(async (tx) => {
    if (Object.keys(input.overrides).length === 0) await tx.delete(deploymentQcSettings).where(eq(deploymentQcSettings.deploymentId, deploymentId));
    else
      await tx
        .insert(deploymentQcSettings)
        .values({ deploymentId, settings: input.overrides, updatedBy: user.id, updatedAt: new Date() })
        .onConflictDoUpdate({ target: deploymentQcSettings.deploymentId, set: { settings: input.overrides, updatedBy: user.id, updatedAt: new Date() } });
    await writeAudit(tx, { actorId: user.id, action: "deployment.qc_settings", entityType: "deployment", entityId: deploymentId, details: { overrides: input.overrides } });
  });
  return getDeploymentQcSettings(user, deploymentId);
}
