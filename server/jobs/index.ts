import type PgBoss from "pg-boss";
import type { QueueSettings } from "./queue";
import { arrayDiagnosticsJob } from "./array-diagnostics.job";
import { buildVersionJob } from "./build-version.job";
import { inspectUploadJob } from "./inspect-upload.job";
import { rebuildSummariesJob } from "./rebuild-summaries.job";
import { releaseFilesJob } from "./release-files.job";

/** A job the worker runs: a queue name, and a handler that is idempotent (safe to retry). */
export interface JobDefinition {
  name: string;
  /** How its queue keeps jobs, when not pg-boss's standard policy (senders must create it the same way). */
  queue?: QueueSettings;
  /** Registers the handler on the queue; returns pg-boss's id of the worker it started (for wake-ups). */
  register(boss: PgBoss): Promise<string>;
}

/** Every job the worker serves. */
export const jobs: JobDefinition[] = [buildVersionJob, rebuildSummariesJob, arrayDiagnosticsJob, releaseFilesJob, inspectUploadJob];
