import PgBoss from "pg-boss";
import { pool } from "../db/client";
import { env } from "../env";
import { logger } from "../lib/logger";

/**
 * Channel on which senders announce a new job (payload: the queue name). Workers LISTEN and wake the queue's
 * handler at once instead of at its next poll; polling stays as the fallback, so a lost notification costs one
 * polling interval, never a job.
 */
export const JOB_CHANNEL = "tauline_jobs";

/** The Postgres-backed job queue (pg-boss, schema "pgboss"). Every app server and worker shares it. */
export function createQueue() {
  return new PgBoss({ connectionString: env.DATABASE_URL, schema: "pgboss" });
}

/** How a queue keeps its jobs (its policy, e.g. "stately": one queued and one active job per singleton key). */
export type QueueSettings = Omit<PgBoss.Queue, "name">;

let sender: Promise<PgBoss> | undefined;
const created = new Set<string>();

/**
 * A queue handle for processes that only send jobs (the API): no maintenance or scheduling of its own, started
 * once per process. Creates a queue on first use, so the API can enqueue before any worker has started.
 */
export async function enqueue(name: string, data: object, options: PgBoss.SendOptions = {}, queue?: QueueSettings): Promise<string | null> {
  sender ??= (async () => {
    const boss = new PgBoss({ connectionString: env.DATABASE_URL, schema: "pgboss", supervise: false, schedule: false, max: 2 });
    boss.on("error", () => undefined);
    await boss.start();
    return boss;
  })();
  const boss = await sender.catch((e) => {
    sender = undefined;
    throw e;
  });
  if (!created.has(name)) {
    await boss.createQueue(name, queue ? { name, ...queue } : undefined);
    created.add(name);
  }
  const id = await boss.send(name, data, options);
  if (id)
    await pool
      .query(`select pg_notify($1, $2)`, [JOB_CHANNEL, name])
      .catch((err) => logger.warn({ err, queue: name }, "job wake-up not sent; a worker takes the job at its next poll"));
  return id;
}

/** Stops the sending handle (tests and graceful shutdown). */
export async function stopSender() {
  const s = sender;
  sender = undefined;
  created.clear();
  if (s) await (await s).stop({ graceful: false, wait: true }).catch(() => undefined);
}
