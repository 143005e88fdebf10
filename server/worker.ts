import "@shared/schemas/messages";
import { pool } from "./db/client";
import { jobs } from "./jobs";
import { createQueue } from "./jobs/queue";
import { listenForJobs } from "./jobs/wake-ups";
import { logger } from "./lib/logger";

/**
 * The processing worker: a separate process that takes jobs from the PostgreSQL queue. Run as many as
 * the queue needs, on as many machines; pg-boss hands each job to one worker at a time.
 */
const boss = createQueue();
boss.on("error", (err) => logger.error({ err }, "queue error"));
await boss.start();
const workerIds = new Map<string, string>();
for (const job of jobs) {
  await boss.createQueue(job.name, job.queue ? { name: job.name, ...job.queue } : undefined);
  workerIds.set(job.name, await job.register(boss));
}
const wakeUps = listenForJobs((queue) => {
  const id = workerIds.get(queue);
  if (id) boss.notifyWorker(id);
});
logger.info(`worker ready; serving ${jobs.length ? jobs.map((j) => j.name).join(", ") : "no job types yet"}`);

let stopping = false;
const stop = async () => {
  if (stopping) return;
  stopping = true;
  await wakeUps.stop();
  await boss.stop({ graceful: true, timeout: 10_000 }).catch(() => {});
  await pool.end().catch(() => {});
  process.exit(0);
};
process.on("SIGINT", () => void stop());
process.on("SIGTERM", () => void stop());
