import type PgBoss from "pg-boss";

/** A job the worker runs: a queue name, and a handler that is idempotent (safe to retry). */
export interface JobDefinition {
  name: string;
  /** Registers the handler on the queue. */
  register(boss: PgBoss): Promise<void>;
}

/** Every job the worker serves. Processing jobs (version builds, summaries, array diagnostics) register here. */
export const jobs: JobDefinition[] = [];
