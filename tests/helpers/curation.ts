import { createHash, randomUUID } from "node:crypto";
import { sql } from "drizzle-orm";
import type { VersionState } from "@shared/schemas/datasets";
import { db } from "../../server/db/client";
import { datasets, uploads, versions } from "../../server/db/schema";

/** A dataset inserted directly (the dataset routes have their own tests). */
export async function makeDataset(projectId: string, title = `Series ${randomUUID().slice(0, 8)}`) {
  const [d] = await db.insert(datasets).values({ projectId, title }).returning();
  return d!.id;
}

/**
 * A version as the processing pipeline leaves it (ready, failed, …), inserted directly: the curation
 * tests start where processing ends. `uploaderId` adds an upload row by that person.
 */
export async function makeVersion(opts: { datasetId: string; state?: VersionState; createdBy?: string | null; uploaderId?: string; summary?: unknown }) {
  let uploadId: string | null = null;
  if (opts.uploaderId) {
    const body = `time,wind_speed\n${randomUUID()}`;
    const [u] = await db
      .insert(uploads)
      .values({
        datasetId: opts.datasetId,
        uploaderId: opts.uploaderId,
        originalName: "merrow-north-logger.csv",
        storageKey: `test/${randomUUID()}`,
        sizeBytes: body.length,
        sha256: createHash("sha256").update(body).digest("hex"),
      })
      .returning();
    uploadId = u!.id;
  }
  const [{ n }] = (await db.execute(sql`select coalesce(max(number), 0)::int + 1 as n from versions where dataset_id = ${opts.datasetId}`)).rows as [{ n: number }];
  const [v] = await db
    .insert(versions)
    .values({ datasetId: opts.datasetId, number: n, state: opts.state ?? "ready", createdBy: opts.createdBy ?? null, uploadId, summary: opts.summary ?? null })
    .returning();
  return v!.id;
}
