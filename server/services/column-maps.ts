import { desc, eq, max } from "drizzle-orm";
import type { ColumnMapRevision, CreateColumnMapInput } from "@shared/schemas/uploads";
import { checkColumnMap } from "@shared/sniff";
import { db } from "../db/client";
import { columnMaps, datasets, platforms, uploads, user as users, deployments } from "../db/schema";
import { AppError, conflict, notFound } from "../lib/errors";
import type { SessionUser } from "../middleware/require-session";
import { assertProjectAccess } from "./access";
import { writeAudit } from "./audit";
import { isUniqueViolation } from "./projects";

async function platformProject(platformId: string): Promise<string> {
  const [p] = await db.select({ projectId: platforms.projectId }).from(platforms).where(eq(platforms.id, platformId));
  if (!p) throw notFound("Platform");
  return p.projectId;
}

type Row = typeof columnMaps.$inferSelect & { createdByName: string | null };
const toRevision = (r: Row): ColumnMapRevision => ({
  id: r.id,
  platformId: r.platformId,
  revision: r.revision,
  map: r.map,
  note: r.note,
  uploadId: r.uploadId,
  createdByName: r.createdByName,
  createdAt: r.createdAt.toISOString(),
});

/** A platform's saved column maps, newest revision first. Members of its project (and admins) may read them. */
export async function listColumnMaps(user: SessionUser, platformId: string): Promise<ColumnMapRevision[]> {
  await assertProjectAccess(user, await platformProject(platformId), "read");
  const rows = await db
    .select({ m: columnMaps, createdByName: users.name })
    .from(columnMaps)
    .leftJoin(users, eq(users.id, columnMaps.createdBy))
    .where(eq(columnMaps.platformId, platformId))
    .orderBy(desc(columnMaps.revision));
  return rows.map((r) => toRevision({ ...r.m, createdByName: r.createdByName }));
}

/**
 * Saves a new revision of a platform's column map (contributors, curators, admins). The map must pass the shared
 * schema and the completeness rules; an upload named with it must belong to a dataset of the same platform.
 */
export async function createColumnMap(user: SessionUser, platformId: string, input: CreateColumnMapInput): Promise<ColumnMapRevision> {
  await assertProjectAccess(user, await platformProject(platformId), "contribute");
  const checked = checkColumnMap(input.map);
  if (!checked.ok) {
    const details: Record<string, string[]> = {};
    for (const p of checked.problems) (details[`map.${p.path}`] ??= []).push(p.message);
    throw new AppError("validation_failed", checked.problems[0]!.message, 400, details);
  }
  if (input.uploadId) {
    const [u] = await db
      .select({ platformId: deployments.platformId })
      .from(uploads)
      .innerJoin(datasets, eq(datasets.id, uploads.datasetId))
      .leftJoin(deployments, eq(deployments.id, datasets.deploymentId))
      .where(eq(uploads.id, input.uploadId));
    if (!u || u.platformId !== platformId) throw new AppError("validation_failed", "That upload is not from this platform", 400, { uploadId: ["Not an upload of this platform"] });
  }
  for (let attempt = 0; attempt < 3; attempt++) {
    try {
      return await db.transaction(async (tx) => {
        const [cur] = await tx.select({ n: max(columnMaps.revision) }).from(columnMaps).where(eq(columnMaps.platformId, platformId));
        const revision = (cur?.n ?? 0) + 1;
        const [row] = await tx
          .insert(columnMaps)
          .values({ platformId, revision, map: checked.map, note: input.note || null, uploadId: input.uploadId ?? null, createdBy: user.id })
          .returning();
        await writeAudit(tx, { actorId: user.id, action: "column_map.save", entityType: "platform", entityId: platformId, toState: `revision ${revision}`, reason: input.note ?? null, details: { columnMapId: row!.id, uploadId: input.uploadId ?? null } });
        return toRevision({ ...row!, createdByName: user.name });
      });
    } catch (err) {
      if (!isUniqueViolation(err, "column_maps_platform_revision_key")) throw err;
    }
  }
  throw conflict("Someone else saved a map for this platform at the same moment; save again.");
}
