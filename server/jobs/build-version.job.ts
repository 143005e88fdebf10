import type PgBoss from "pg-boss";
import { z } from "zod";
import { idSchema } from "@shared/schemas/common";
import { pool } from "../db/client";
import { logger } from "../lib/logger";
import { buildVersion, finishUnbuilt } from "../pipeline/build";
import type { JobDefinition } from "./index";
import { enqueue } from "./queue";

/** Builds a version from its upload (and base version): see server/pipeline/build.ts. */
export const BUILD_VERSION = "build-version";
export const buildVersionPayloadSchema = z.object({ versionId: idSchema });

const tuning = z
  .object({
    /** A running build whose heartbeat is older than this is taken as dead (worker killed) and retried, s. */
    BUILD_STALE_AFTER_S: z.coerce.number().positive().default(60),
    BUILD_MONITOR_EVERY_S: z.coerce.number().positive().default(15),
    BUILD_RETRY_LIMIT: z.coerce.number().int().min(0).default(3),
    BUILD_CHUNK_BYTES: z.coerce.number().int().positive().optional(),
  })
  .parse(process.env);

export const buildSendOptions: PgBoss.SendOptions = { retryLimit: tuning.BUILD_RETRY_LIMIT, retryDelay: 2, expireInSeconds: 4 * 3600 };

/** Queues a build of `versionId`; returns the job id. */
export function enqueueBuild(versionId: string) {
  return enqueue(BUILD_VERSION, { versionId }, buildSendOptions);
}

export const buildVersionJob: JobDefinition = {
  name: BUILD_VERSION,
  async register(boss) {
    const workerId = await boss.work<{ versionId: string }>(BUILD_VERSION, { pollingIntervalSeconds: 0.5, includeMetadata: true, batchSize: 1 }, async ([job]) => {
      const log = logger.child({ job: BUILD_VERSION, jobId: job!.id });
      const { versionId } = buildVersionPayloadSchema.parse(job!.data);
      log.info({ versionId, retry: job!.retryCount }, `[${BUILD_VERSION}][${job!.id}] start`);
      try {
        const outcome = await buildVersion(versionId, { jobId: job!.id, chunkBytes: tuning.BUILD_CHUNK_BYTES });
        log.info({ versionId, outcome }, `[${BUILD_VERSION}][${job!.id}] finish`);
        if (outcome === "built") await enqueueArrayDiagnosticsFor(versionId).catch((err) => log.warn({ err }, "array diagnostics not queued"));
        return { outcome };
      } catch (err) {
        log.error({ err, versionId }, `[${BUILD_VERSION}][${job!.id}] failed`);
        const last = job!.retryCount >= job!.retryLimit;
        if (last) {
          await finishUnbuilt(versionId, "failed", {
            message: `Processing stopped after ${job!.retryCount + 1} attempts because of a server problem (ref ${job!.id}). Retry the version; if it fails again, ask an admin to check the database and the worker logs.`,
          }).catch(() => undefined);
        } else {
          await pool.query(`update qc_runs set state = 'queued', stage = 'queued', heartbeat_at = null where version_id = $1 and state = 'running'`, [versionId]).catch(() => undefined);
        }
        throw err;
      }
    });
    // Builds of a killed worker stay "active" in the queue; their heartbeat stops, so any worker fails them over.
    const monitor = setInterval(() => void failOverStaleBuilds(boss).catch((err) => logger.warn({ err }, "stale build check failed")), tuning.BUILD_MONITOR_EVERY_S * 1000);
    monitor.unref();
    return workerId;
  },
};

/** Hands builds whose worker stopped (no heartbeat) back to the queue for a retry. */
export async function failOverStaleBuilds(boss: PgBoss) {
  const { rows } = await pool.query<{ version_id: string; job_id: string | null }>(
    `update qc_runs set state = 'queued', stage = 'queued', heartbeat_at = null
      where state = 'running' and heartbeat_at < now() - make_interval(secs => $1) returning version_id, job_id`,
    [tuning.BUILD_STALE_AFTER_S],
  );
  for (const r of rows) {
    if (!r.job_id) continue;
    const job = await boss.getJobById(BUILD_VERSION, r.job_id);
    if (job?.state === "active") {
      logger.warn({ versionId: r.version_id, jobId: r.job_id }, `[${BUILD_VERSION}][${r.job_id}] worker stopped responding; retrying`);
      await boss.fail(BUILD_VERSION, r.job_id, { reason: "the worker stopped responding" });
    }
  }
}

async function enqueueArrayDiagnosticsFor(versionId: string) {
  const { rows } = await pool.query<{ project_id: string }>(`select d.project_id from versions v join datasets d on d.id = v.dataset_id where v.id = $1`, [versionId]);
  const { enqueueArrayDiagnostics } = await import("./array-diagnostics.job");
  if (rows[0]) await enqueueArrayDiagnostics(rows[0].project_id);
}
