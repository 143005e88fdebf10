import type PgBoss from "pg-boss";
import { arrayDiagnosticsJob } from "./array-diagnostics.job";
import { buildVersionJob } from "./build-version.job";
import { rebuildSummariesJob } from "./rebuild-summaries.job";
import { releaseFilesJob } from "./release-files.job";

/** A job the worker runs: a queue name, and a handler that is idempotent (safe to retry). */
export interface JobDefinition {
  name: string;
  /** Registers the handler on the queue. */
  register(boss: PgBoss): Promise<void>;
}

/** Every job the worker serves. */
export const jobs: JobDefinition[] = [buildVersionJob, rebuildSummariesJob, arrayDiagnosticsJob, releaseFilesJob];
