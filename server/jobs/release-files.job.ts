import { createHash } from "node:crypto";
import { createWriteStream } from "node:fs";
import { mkdir, rename, rm, stat } from "node:fs/promises";
import { dirname } from "node:path";
import { pipeline } from "node:stream/promises";
import { eq } from "drizzle-orm";
import { z } from "zod";
import { idSchema } from "@shared/schemas/common";
import { downloadFormats, downloadQuerySchema, type DownloadFormat } from "@shared/schemas/downloads";
import { db } from "../db/client";
import { releaseFiles, releases } from "../db/schema";
import { pathForKey, releaseFileKey } from "../lib/file-store";
import { logger } from "../lib/logger";
import { formatExtension, planVersion, slug, tap, writeDownload } from "../services/downloads";
import { recordReleaseFile } from "../services/releases";
import type { JobDefinition } from "./index";
import { enqueue } from "./queue";

/** Builds a release's whole-version files once, at release, and fixes their SHA-256 in release_files. */
export const RELEASE_FILES = "release-files";
const payloadSchema = z.object({ releaseId: idSchema });

export const formatNumber: Record<DownloadFormat, 1 | 2 | 3> = { csv: 1, datapackage: 2, parquet: 3 };

export function enqueueReleaseFiles(releaseId: string) {
  return enqueue(RELEASE_FILES, { releaseId }, { retryLimit: 3, retryDelay: 30, singletonKey: releaseId });
}

/** The name a release file is offered under (built from the server's own title slug). */
export function releaseFileName(datasetTitle: string, versionNumber: number, format: DownloadFormat) {
  return `${slug(datasetTitle)}-v${versionNumber}.${formatExtension[format]}`;
}

/**
 * Idempotent: formats already recorded are skipped, a half-written file is rewritten. Each file is written to a
 * ".part" path while its SHA-256 is computed from the bytes as they pass, then renamed and recorded.
 * Returns the names recorded by this run.
 */
export async function buildReleaseFiles(releaseId: string): Promise<string[]> {
  const [rel] = await db.select().from(releases).where(eq(releases.id, releaseId));
  if (!rel || rel.retractedAt) return [];
  const have = new Set((await db.select({ format: releaseFiles.format }).from(releaseFiles).where(eq(releaseFiles.releaseId, releaseId))).map((f) => f.format));
  const plan = await planVersion(rel.versionId, downloadQuerySchema.parse({}));
  const made: string[] = [];
  for (const format of downloadFormats) {
    if (have.has(format)) continue;
    const path = pathForKey(releaseFileKey(releaseId, formatNumber[format]));
    const part = `${path}.part`;
    await mkdir(dirname(path), { recursive: true });
    const hash = createHash("sha256");
    let size = 0;
    const counter = tap((b) => {
      hash.update(b);
      size += b.length;
    });
    const file = createWriteStream(part);
    try {
      await Promise.all([writeDownload(plan, format, counter), pipeline(counter, file)]);
    } catch (e) {
      await rm(part, { force: true });
      throw e;
    }
    await rename(part, path);
    const written = (await stat(path)).size;
    if (written !== size) throw new Error(`release file ${format}: wrote ${written} bytes, hashed ${size}`);
    const name = releaseFileName(rel.datasetTitle, rel.versionNumber, format);
    try {
      await recordReleaseFile(releaseId, { format, name, sizeBytes: size, sha256: hash.digest("hex") });
      made.push(name);
    } catch (e) {
      // Another run recorded it first; its checksum stands and this file must match it (verify shows if not).
      if ((e as { code?: string; cause?: { code?: string } }).code !== "23505" && (e as { cause?: { code?: string } }).cause?.code !== "23505") throw e;
    }
  }
  return made;
}

export const releaseFilesJob: JobDefinition = {
  name: RELEASE_FILES,
  async register(boss) {
    return boss.work<{ releaseId: string }>(RELEASE_FILES, { pollingIntervalSeconds: 1, batchSize: 1 }, async ([job]) => {
      const { releaseId } = payloadSchema.parse(job!.data);
      logger.info({ releaseId }, `[${RELEASE_FILES}][${job!.id}] start`);
      const made = await buildReleaseFiles(releaseId);
      logger.info({ releaseId, made }, `[${RELEASE_FILES}][${job!.id}] finish`);
      return { made };
    });
  },
};
