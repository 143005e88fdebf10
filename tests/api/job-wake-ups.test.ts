import { randomUUID } from "node:crypto";
import { afterAll, describe, expect, test } from "vitest";
import { pool } from "../../server/db/client";
import { enqueue, stopSender } from "../../server/jobs/queue";
import { listenForJobs } from "../../server/jobs/wake-ups";

/**
 * Senders announce each job on a PostgreSQL channel and workers wake the queue's handler at once (polling is only
 * the fallback). Shown with the real queue and a real LISTEN connection, including one the server drops.
 */
afterAll(async () => {
  await stopSender();
});

const waitFor = async (cond: () => Promise<boolean> | boolean, what: string) => {
  const until = Date.now() + 15_000;
  while (!(await cond())) {
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
};

describe("job wake-ups", () => {
  test("a sent job wakes its queue's listener, also after the server dropped the listening connection", async () => {
    const app = `tauline-test-wake-${randomUUID().slice(0, 8)}`;
    const queue = `wake-test-${randomUUID().slice(0, 8)}`;
    const woken: string[] = [];
    const listener = listenForJobs((q) => woken.push(q), { applicationName: app, retryMs: 100 });
    const backend = async () => (await pool.query(`select pid from pg_stat_activity where application_name = $1 and query ilike 'listen%'`, [app])).rows[0]?.pid as number | undefined;
    try {
      await waitFor(async () => (await backend()) !== undefined, "the listener to connect");
      const id = await enqueue(queue, { n: 1 });
      expect(id).toBeTruthy();
      await waitFor(() => woken.includes(queue), "the first wake-up");

      // The server ends the listening connection (as on a restart or a network fault); the listener comes back.
      const pid = (await backend())!;
      await pool.query(`select pg_terminate_backend($1)`, [pid]);
      await waitFor(async () => {
        const p = await backend();
        return p !== undefined && p !== pid;
      }, "the listener to reconnect");
      const before = woken.length;
      await enqueue(queue, { n: 2 });
      await waitFor(() => woken.length > before, "a wake-up after reconnecting");
      expect(woken.slice(before)).toEqual([queue]);
    } finally {
      await listener.stop();
    }
    // Stopped: nothing listens under that name any more.
    await waitFor(async () => (await backend()) === undefined, "the listener to close");
  });
});
