import { randomUUID } from "node:crypto";
import { asc, desc, eq, inArray, sql } from "drizzle-orm";
import type { ReasonInput, Release, ReleaseInput } from "@shared/schemas/curation";
import type { Db } from "../db/client";
import { db } from "../db/client";
import { datasets, memberships, releaseFiles, releases, user as users, versions } from "../db/schema";
import { AppError, notFound } from "../lib/errors";
import type { SessionUser } from "../middleware/require-session";
import { getProjectRole } from "./access";
import { getDataset } from "./datasets";
import { writeAudit } from "./audit";
import { assertTransition, loadVersionContext, versionForMember, type Tx, type VersionContext } from "./curation";
import { enqueueReleaseFiles } from "../jobs/release-files.job";
import { invalidateCatalogue } from "./catalogue";
import { logger } from "../lib/logger";
import { appUrl, deliver, followerIds, notify, projectMemberIds } from "./notifications";

export const releasePath = (releaseId: string) => `/releases/${releaseId}`;

/** "A", "A and B", "A, B and C". */
function joinNames(names: string[]) {
  return names.length <= 1 ? (names[0] ?? "") : `${names.slice(0, -1).join(", ")} and ${names[names.length - 1]}`;
}

/**
 * The citation text of a release. Tauline's own form: authors (year). Title, version N [data set].
 * Project. Tauline release R. Stable URL. Kept as text on the release so it never changes afterwards.
 */
export function buildCitation(r: { authors: string[]; year: number; datasetTitle: string; versionNumber: number; projectName: string; releaseNumber: number; stableUrl: string }) {
  return `${joinNames(r.authors)} (${r.year}). ${r.datasetTitle}, version ${r.versionNumber} [data set]. ${r.projectName}. Tauline release ${r.releaseNumber}. ${r.stableUrl}`;
}

/** Default authors: whoever built the version, then the uploader, then the project's curators by name. */
async function defaultAuthors(tx: Tx, v: VersionContext): Promise<string[]> {
  const ids = [v.createdBy, v.uploaderId].filter((x): x is string => !!x);
  const named = ids.length ? await tx.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, ids)) : [];
  const curators = await tx
    .select({ name: users.name })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(sql`${memberships.projectId} = ${v.projectId} and ${memberships.role} = 'curator'`)
    .orderBy(asc(users.name));
  const names = [...ids.map((id) => named.find((n) => n.id === id)?.name), ...curators.map((c) => c.name)].filter((n): n is string => !!n);
  return [...new Set(names)];
}

async function audienceOf(tx: Tx, v: VersionContext, actorId: string) {
  const people = new Set([...(await projectMemberIds(tx, v.projectId)), ...(await followerIds(tx, v.datasetId))]);
  people.delete(actorId);
  return people;
}

// POST /api/versions/:id/release
/** Releases an approved version: writes the immutable release row, supersedes the previous release, tells members and followers. */
export async function releaseVersion(user: SessionUser, versionId: string, input: ReleaseInput): Promise<Release> {
  await versionForMember(user, versionId, "curate");
  const { releaseId, mails } = await db.transaction(async (tx) => {
    const pre = await loadVersionContext(tx, versionId);
    if (!pre) throw notFound("Version");
    // Releases of one dataset are numbered one after another, so they queue on the dataset row.
    const [dataset] = await tx.select().from(datasets).where(eq(datasets.id, pre.datasetId)).for("update");
    const v = (await loadVersionContext(tx, versionId, true))!;
    assertTransition("release", v);
    const [{ n }] = (await tx
      .select({ n: sql<number>`coalesce(max(${releases.releaseNumber}), 0)::int` })
      .from(releases)
      .where(eq(releases.datasetId, v.datasetId))) as [{ n: number }];
    const releaseNumber = n + 1;
    const id = randomUUID();
    const stableUrl = appUrl(releasePath(id));
    const releasedAt = new Date();
    const authors = input.authors?.length ? input.authors : await defaultAuthors(tx, v);
    if (!authors.length) throw new AppError("unprocessable", "Name at least one author for the citation", 422, { authors: ["Name at least one author"] });
    const citation = buildCitation({
      authors,
      year: releasedAt.getUTCFullYear(),
      datasetTitle: v.datasetTitle,
      versionNumber: v.number,
      projectName: v.projectName,
      releaseNumber,
      stableUrl,
    });
    await tx.insert(releases).values({
      id,
      versionId: v.id,
      datasetId: v.datasetId,
      releaseNumber,
      versionNumber: v.number,
      releasedAt,
      releasedBy: user.id,
      projectName: v.projectName,
      datasetTitle: v.datasetTitle,
      authors,
      citation,
      stableUrl,
      licence: input.licence ?? dataset!.licence,
      notes: input.notes || null,
    });
    const [current] = await tx
      .select({ id: versions.id, number: versions.number })
      .from(versions)
      .where(sql`${versions.datasetId} = ${v.datasetId} and ${versions.state} = 'released'`)
      .for("update");
    if (current) {
      await tx.update(versions).set({ state: "superseded", stateChangedAt: releasedAt }).where(eq(versions.id, current.id));
      await writeAudit(tx, {
        actorId: user.id,
        action: "version.supersede",
        entityType: "version",
        entityId: current.id,
        fromState: "released",
        toState: "superseded",
        reason: `Superseded by version ${v.number} (release ${releaseNumber})`,
      });
    }
    await tx.update(versions).set({ state: "released", stateChangedAt: releasedAt }).where(eq(versions.id, v.id));
    await writeAudit(tx, {
      actorId: user.id,
      action: "version.release",
      entityType: "version",
      entityId: v.id,
      fromState: "approved",
      toState: "released",
      reason: input.notes || null,
      details: { releaseId: id, releaseNumber, licence: input.licence ?? dataset!.licence },
    });
    const mails = await notify(tx, await audienceOf(tx, v, user.id), {
      kind: "version_released",
      title: `Released: ${v.datasetTitle}, version ${v.number}`,
      body: `${user.name} released version ${v.number} of "${v.datasetTitle}" (${v.projectName}) as release ${releaseNumber}.\n\nCite it as:\n${citation}`,
      link: releasePath(id),
      versionId: v.id,
      because: `You receive this because you are a member of ${v.projectName} or follow this dataset.`,
    });
    return { releaseId: id, mails };
  });
  void deliver(mails);
  // The whole-release files (CSV, data package, Parquet) and their checksums are built by a job.
  enqueueReleaseFiles(releaseId).catch((err) => logger.error({ err, releaseId }, "could not queue the release files"));
  invalidateCatalogue();
  return getRelease(user, releaseId);
}

// POST /api/versions/:id/retract
/** Retracts a release with a reason: the release stays as a tombstone (citation, checksums); the data is then for members only. */
export async function retractVersion(user: SessionUser, versionId: string, input: ReasonInput): Promise<Release> {
  await versionForMember(user, versionId, "curate");
  const { releaseId, mails } = await db.transaction(async (tx) => {
    const v = await loadVersionContext(tx, versionId, true);
    if (!v) throw notFound("Version");
    assertTransition("retract", v);
    const now = new Date();
    const [rel] = await tx
      .update(releases)
      .set({ retractedAt: now, retractedBy: user.id, retractionReason: input.reason })
      .where(eq(releases.versionId, v.id))
      .returning({ id: releases.id, releaseNumber: releases.releaseNumber });
    if (!rel) throw notFound("Release");
    await tx.update(versions).set({ state: "retracted", stateChangedAt: now }).where(eq(versions.id, v.id));
    await writeAudit(tx, {
      actorId: user.id,
      action: "version.retract",
      entityType: "version",
      entityId: v.id,
      fromState: v.state,
      toState: "retracted",
      reason: input.reason,
      details: { releaseId: rel.id },
    });
    const mails = await notify(tx, await audienceOf(tx, v, user.id), {
      kind: "release_retracted",
      title: `Retracted: ${v.datasetTitle}, version ${v.number}`,
      body: `${user.name} retracted release ${rel.releaseNumber} (version ${v.number} of "${v.datasetTitle}", ${v.projectName}).\n\nReason: ${input.reason}\n\nIf you used this data, check the reason before relying on it.`,
      link: releasePath(rel.id),
      versionId: v.id,
      because: `You receive this because you are a member of ${v.projectName} or follow this dataset.`,
    });
    return { releaseId: rel.id, mails };
  });
  void deliver(mails);
  invalidateCatalogue();
  return getRelease(user, releaseId);
}

async function isMemberOf(user: SessionUser | null | undefined, projectId: string) {
  return !!user && (user.isAdmin || (await getProjectRole(user, projectId)) !== null);
}

function toRelease(
  r: typeof releases.$inferSelect,
  extra: { releasedByName: string | null; retractedByName: string | null; versionState: Release["versionState"]; files: (typeof releaseFiles.$inferSelect)[]; dataAvailable: boolean },
): Release {
  return {
    id: r.id,
    datasetId: r.datasetId,
    versionId: r.versionId,
    projectName: r.projectName,
    datasetTitle: r.datasetTitle,
    versionNumber: r.versionNumber,
    releaseNumber: r.releaseNumber,
    releasedAt: r.releasedAt.toISOString(),
    releasedByName: extra.releasedByName,
    authors: r.authors,
    citation: r.citation,
    stableUrl: r.stableUrl,
    licence: r.licence,
    notes: r.notes,
    files: extra.files.map((f) => ({ format: f.format, name: f.name, sizeBytes: f.sizeBytes, sha256: f.sha256, createdAt: f.createdAt.toISOString() })),
    retracted: r.retractedAt ? { at: r.retractedAt.toISOString(), reason: r.retractionReason ?? "", byName: extra.retractedByName } : null,
    versionState: extra.versionState,
    dataAvailable: extra.dataAvailable,
  };
}

// GET /api/releases/:id
/** Public: a live release, or the tombstone of a retracted one (reason, citation, checksums). */
export async function getRelease(user: SessionUser | null | undefined, releaseId: string): Promise<Release> {
  const [r] = await db
    .select({ r: releases, state: versions.state, projectId: datasets.projectId })
    .from(releases)
    .innerJoin(versions, eq(versions.id, releases.versionId))
    .innerJoin(datasets, eq(datasets.id, releases.datasetId))
    .where(eq(releases.id, releaseId));
  if (!r) throw notFound("Release");
  const people = [r.r.releasedBy, r.r.retractedBy].filter((x): x is string => !!x);
  const names = people.length ? await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, people)) : [];
  const files = await db.select().from(releaseFiles).where(eq(releaseFiles.releaseId, releaseId)).orderBy(asc(releaseFiles.name));
  return toRelease(r.r, {
    releasedByName: names.find((n) => n.id === r.r.releasedBy)?.name ?? null,
    retractedByName: names.find((n) => n.id === r.r.retractedBy)?.name ?? null,
    versionState: r.state,
    files,
    dataAvailable: !r.r.retractedAt || (await isMemberOf(user, r.projectId)),
  });
}

// GET /api/datasets/:id/releases
/** Public: every release of a dataset, newest first, retracted ones included (as tombstones). */
export async function listDatasetReleases(user: SessionUser | null | undefined, datasetId: string): Promise<Release[]> {
  const rows = await db.select({ id: releases.id }).from(releases).where(eq(releases.datasetId, datasetId)).orderBy(desc(releases.releaseNumber));
  // A dataset that was never released stays as private as its dataset page.
  if (!rows.length) await getDataset(user, datasetId);
  return Promise.all(rows.map((r) => getRelease(user, r.id)));
}

/**
 * Records one file offered for download from a release, with its SHA-256 (lower-case hex). Called by
 * whoever writes the file (the download builders); the row can never be changed or removed afterwards,
 * and nothing can be added to a retracted release.
 */
export async function recordReleaseFile(
  releaseId: string,
  file: { format: string; name: string; sizeBytes: number; sha256: string },
  tx: Tx | Db = db,
): Promise<void> {
  if (!/^[0-9a-f]{64}$/.test(file.sha256)) throw new Error(`recordReleaseFile: sha256 must be 64 lower-case hex digits, got ${file.sha256}`);
  await tx.insert(releaseFiles).values({ releaseId, format: file.format, name: file.name, sizeBytes: file.sizeBytes, sha256: file.sha256 });
}

/**
 * Who may read a version's data (for downloads, plots, records): released and superseded versions are
 * public; everything else, retracted versions included, only the project's members and admins.
 */
export async function canReadVersionData(user: SessionUser | null | undefined, versionId: string): Promise<boolean> {
  const [v] = await db
    .select({ state: versions.state, projectId: datasets.projectId })
    .from(versions)
    .innerJoin(datasets, eq(datasets.id, versions.datasetId))
    .where(eq(versions.id, versionId));
  if (!v) return false;
  if (v.state === "released" || v.state === "superseded") return true;
  return isMemberOf(user, v.projectId);
}
