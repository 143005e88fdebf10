import { and, asc, desc, eq, ilike, inArray, ne, or, sql } from "drizzle-orm";
import type { CatalogueEntry, CreateDatasetInput, Dataset, ReviewQueueItem, UpdateDatasetInput, VersionSummary } from "@shared/schemas/datasets";
import type { platformKinds } from "@shared/schemas/platforms";
import { db } from "../db/client";
import { datasets, deployments, memberships, platforms, projects, uploads, user as users, versions } from "../db/schema";
import { AppError, conflict, notFound, unauthenticated } from "../lib/errors";
import type { SessionUser } from "../middleware/require-session";
import { assertProjectAccess, getProjectRole } from "./access";
import { writeAudit } from "./audit";
import { isUniqueViolation } from "./projects";

const baseSelect = () =>
  db
    .select({
      d: datasets,
      projectName: projects.name,
      deploymentName: deployments.name,
      platformId: platforms.id,
      platformName: platforms.name,
      platformKind: platforms.kind,
    })
    .from(datasets)
    .innerJoin(projects, eq(projects.id, datasets.projectId))
    .leftJoin(deployments, eq(deployments.id, datasets.deploymentId))
    .leftJoin(platforms, eq(platforms.id, deployments.platformId));

type BaseRow = Awaited<ReturnType<ReturnType<typeof baseSelect>["execute"]>>[number];

async function versionsOf(datasetIds: string[]): Promise<Map<string, VersionSummary[]>> {
  const out = new Map<string, VersionSummary[]>();
  if (!datasetIds.length) return out;
  const rows = await db
    .select({ v: versions, by: users.name })
    .from(versions)
    .leftJoin(users, eq(users.id, versions.createdBy))
    .where(inArray(versions.datasetId, datasetIds))
    .orderBy(desc(versions.number));
  for (const r of rows) {
    const list = out.get(r.v.datasetId) ?? [];
    list.push({ id: r.v.id, number: r.v.number, state: r.v.state, createdAt: r.v.createdAt.toISOString(), createdBy: r.by });
    out.set(r.v.datasetId, list);
  }
  return out;
}

function toDataset(r: BaseRow, vs: VersionSummary[], membersView: boolean): Dataset {
  const visible = membersView ? vs : vs.filter((v) => v.state === "released");
  return {
    id: r.d.id,
    projectId: r.d.projectId,
    projectName: r.projectName,
    deploymentId: r.d.deploymentId,
    deploymentName: r.deploymentName,
    platformId: r.platformId,
    platformName: r.platformName,
    platformKind: r.platformKind,
    title: r.d.title,
    description: r.d.description,
    licence: r.d.licence,
    createdAt: r.d.createdAt.toISOString(),
    versions: visible,
    latestRelease: vs.find((v) => v.state === "released") ?? null,
  };
}

export async function listDatasets(user: SessionUser, projectId: string): Promise<Dataset[]> {
  await assertProjectAccess(user, projectId, "read");
  const rows = await baseSelect().where(eq(datasets.projectId, projectId)).orderBy(asc(datasets.title));
  const vs = await versionsOf(rows.map((r) => r.d.id));
  return rows.map((r) => toDataset(r, vs.get(r.d.id) ?? [], true));
}

/** Members (and admins) see every version; everyone else sees a dataset only once a version is released. */
export async function getDataset(user: SessionUser | null | undefined, datasetId: string): Promise<Dataset> {
  const [row] = await baseSelect().where(eq(datasets.id, datasetId));
  if (!row) throw notFound("Dataset");
  const vs = (await versionsOf([datasetId])).get(datasetId) ?? [];
  const isMember = !!user && (user.isAdmin || (await getProjectRole(user, row.d.projectId)) !== null);
  if (!isMember && !vs.some((v) => v.state === "released")) {
    if (!user) throw unauthenticated();
    throw new AppError("forbidden", "This dataset has no public release yet", 403);
  }
  return toDataset(row, vs, isMember);
}

async function assertDeploymentInProject(deploymentId: string, projectId: string) {
  const [d] = await db
    .select({ projectId: platforms.projectId })
    .from(deployments)
    .innerJoin(platforms, eq(platforms.id, deployments.platformId))
    .where(eq(deployments.id, deploymentId));
  if (!d || d.projectId !== projectId) {
    throw new AppError("unprocessable", "The deployment is not part of this project", 422, { deploymentId: ["Choose a deployment of this project"] });
  }
}

const titleConflict = () => conflict("This project already has a dataset with that title", { title: ["Already used in this project"] });

export async function createDataset(user: SessionUser, projectId: string, input: CreateDatasetInput): Promise<Dataset> {
  await assertProjectAccess(user, projectId, "contribute");
  if (input.deploymentId) await assertDeploymentInProject(input.deploymentId, projectId);
  let id: string;
  try {
    id = await db.transaction(async (tx) => {
      const [d] = await tx
        .insert(datasets)
        .values({ projectId, title: input.title, description: input.description, deploymentId: input.deploymentId ?? null, licence: input.licence ?? "CC-BY-4.0" })
        .returning();
      await writeAudit(tx, { actorId: user.id, action: "dataset.create", entityType: "dataset", entityId: d!.id, details: input });
      return d!.id;
    });
  } catch (err) {
    if (isUniqueViolation(err)) throw titleConflict();
    throw err;
  }
  return getDataset(user, id);
}

export async function updateDataset(user: SessionUser, datasetId: string, input: UpdateDatasetInput): Promise<Dataset> {
  const [d] = await db.select().from(datasets).where(eq(datasets.id, datasetId));
  if (!d) throw notFound("Dataset");
  await assertProjectAccess(user, d.projectId, "contribute");
  const movesDeployment = input.deploymentId !== undefined && input.deploymentId !== d.deploymentId;
  if (movesDeployment && input.deploymentId) await assertDeploymentInProject(input.deploymentId, d.projectId);
  try {
    await db.transaction(async (tx) => {
      if (movesDeployment) {
        // Same lock as creating a version, so no build can start between this check and the change.
        await tx.execute(sql`select id from datasets where id = ${datasetId} for update`);
        const built = await tx.execute(sql`select 1 from versions where dataset_id = ${datasetId} and state <> 'failed' limit 1`);
        if (built.rows.length) {
          throw conflict("The deployment can change only until the first version is built; make a new dataset for another deployment", {
            deploymentId: ["Fixed once a version is built"],
          });
        }
      }
      await tx.update(datasets).set(input).where(eq(datasets.id, datasetId));
      await writeAudit(tx, { actorId: user.id, action: "dataset.update", entityType: "dataset", entityId: datasetId, details: input });
    });
  } catch (err) {
    if (isUniqueViolation(err)) throw titleConflict();
    throw err;
  }
  return getDataset(user, datasetId);
}

/** Public catalogue: datasets with at least one released version, newest release first. */
export async function listCatalogue(query: { q?: string; kind?: (typeof platformKinds)[number] }): Promise<CatalogueEntry[]> {
  const released = db
    .select({
      datasetId: versions.datasetId,
      number: sql<number>`max(${versions.number})`.as("number"),
      releasedAt: sql<Date>`max(${versions.stateChangedAt})`.as("released_at"),
    })
    .from(versions)
    .where(eq(versions.state, "released"))
    .groupBy(versions.datasetId)
    .as("released");
  const conds = [];
  if (query.q) {
    const like = `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    conds.push(or(ilike(datasets.title, like), ilike(projects.name, like), ilike(platforms.name, like)));
  }
  if (query.kind) conds.push(eq(platforms.kind, query.kind));
  const rows = await db
    .select({
      d: datasets,
      projectName: projects.name,
      platformName: platforms.name,
      platformKind: platforms.kind,
      latitude: deployments.latitude,
      longitude: deployments.longitude,
      startTime: deployments.startTime,
      endTime: deployments.endTime,
      number: released.number,
      releasedAt: released.releasedAt,
    })
    .from(datasets)
    .innerJoin(released, eq(released.datasetId, datasets.id))
    .innerJoin(projects, eq(projects.id, datasets.projectId))
    .leftJoin(deployments, eq(deployments.id, datasets.deploymentId))
    .leftJoin(platforms, eq(platforms.id, deployments.platformId))
    .where(conds.length ? and(...conds) : undefined)
    .orderBy(desc(released.releasedAt))
    .limit(500);
  return rows.map((r) => ({
    id: r.d.id,
    title: r.d.title,
    projectName: r.projectName,
    platformName: r.platformName,
    platformKind: r.platformKind,
    latitude: r.latitude,
    longitude: r.longitude,
    startTime: r.startTime ? r.startTime.toISOString() : null,
    endTime: r.endTime ? r.endTime.toISOString() : null,
    releasedVersion: Number(r.number),
    releasedAt: new Date(r.releasedAt).toISOString(),
    licence: r.d.licence,
  }));
}

/** Versions waiting for review in the caller's projects, excluding their own (four eyes). */
export async function listReviewQueue(user: SessionUser): Promise<ReviewQueueItem[]> {
  const curated = user.isAdmin
    ? undefined
    : db.select({ id: memberships.projectId }).from(memberships).where(and(eq(memberships.userId, user.id), eq(memberships.role, "curator")));
  const rows = await db
    .select({
      versionId: versions.id,
      datasetId: datasets.id,
      datasetTitle: datasets.title,
      projectName: projects.name,
      number: versions.number,
      submittedAt: versions.stateChangedAt,
      submittedBy: users.name,
    })
    .from(versions)
    .innerJoin(datasets, eq(datasets.id, versions.datasetId))
    .innerJoin(projects, eq(projects.id, datasets.projectId))
    .leftJoin(users, eq(users.id, versions.createdBy))
    .leftJoin(uploads, eq(uploads.id, versions.uploadId))
    .where(
      and(
        eq(versions.state, "in_review"),
        or(sql`${versions.createdBy} is null`, ne(versions.createdBy, user.id)),
        // Whoever uploaded the file cannot review it either.
        or(sql`${uploads.uploaderId} is null`, ne(uploads.uploaderId, user.id)),
        curated ? inArray(datasets.projectId, curated) : undefined,
      ),
    )
    .orderBy(asc(versions.stateChangedAt));
  return rows.map((r) => ({ ...r, submittedAt: r.submittedAt.toISOString(), submittedBy: r.submittedBy ?? "unknown" }));
}
