import pg from "pg";
import { env } from "../env";
import { logger } from "../lib/logger";
import { JOB_CHANNEL } from "./queue";

/**
 * Listens on the job channel with a connection of its own and calls `wake` with each announced queue name. A lost
 * connection is opened again after a second, then after twice as long each time it fails again (up to 30 s, so an
 * outage does not flood the log); meanwhile the workers' polling picks jobs up as before.
 */
export function listenForJobs(wake: (queue: string) => void, opts: { applicationName?: string; retryMs?: number } = {}) {
  let client: pg.Client | null = null;
  let stopped = false;
  let retry: NodeJS.Timeout | undefined;
  const firstDelay = opts.retryMs ?? 1000;
  let delay = firstDelay;

  const connect = async () => {
    const c = new pg.Client({ connectionString: env.DATABASE_URL, application_name: opts.applicationName ?? "tauline-worker-wake-ups" });
    const lost = (err?: Error) => {
      if (client !== c) return;
      client = null;
      c.end().catch(() => undefined);
      if (stopped) return;
      if (delay === firstDelay) logger.warn({ err }, "job wake-up connection lost; polling only until it is back");
      retry = setTimeout(() => void connect(), delay);
      delay = Math.min(delay * 2, 30_000);
      retry.unref();
    };
    c.on("error", lost);
    c.on("end", () => lost());
    c.on("notification", (m) => {
      if (m.channel === JOB_CHANNEL && m.payload) wake(m.payload);
    });
    client = c;
    try {
      await c.connect();
      await c.query(`listen ${JOB_CHANNEL}`);
      if (delay !== firstDelay) logger.info("job wake-up connection back");
      delay = firstDelay;
    } catch (err) {
      lost(err as Error);
    }
  };
  void connect();

  return {
    async stop() {
      stopped = true;
      clearTimeout(retry);
      const c = client;
      client = null;
      await c?.end().catch(() => undefined);
    },
  };
}
