import type { ClientRateLimitInfo, Options, Store } from "express-rate-limit";
import { pool } from "../db/client";

/** How often each process clears windows that ended (they are also overwritten when their key comes back). */
const PRUNE_EVERY_MS = 10 * 60_000;
let lastPrune = 0;

/**
 * An express-rate-limit store that keeps its counts in PostgreSQL (table request_limits), so every app server
 * behind a balancer shares them and a limit holds for the whole deployment, not per server. Fixed windows, as in
 * the library's memory store: the first hit of a key opens a window of `windowMs`; hits in it are counted; the
 * first hit after it opens the next. One statement per counted request; `prefix` keeps each limit's keys apart.
 */
export class PgRateLimitStore implements Store {
  windowMs = 60_000;
  /** Counts are shared between processes (express-rate-limit's flag for stores that are not in memory). */
  localKeys = false;

  constructor(readonly prefix: string) {}

  init(options: Pick<Options, "windowMs">) {
    this.windowMs = options.windowMs;
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const { rows } = await pool.query<{ hits: number; reset_at: Date }>(`select hits, reset_at from request_limits where key = $1 and reset_at > clock_timestamp()`, [
      this.prefix + key,
    ]);
    return rows[0] ? { totalHits: rows[0].hits, resetTime: rows[0].reset_at } : undefined;
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const { rows } = await pool.query<{ hits: number; reset_at: Date }>(
      `insert into request_limits as l (key, hits, reset_at) values ($1, 1, clock_timestamp() + $2 * interval '1 millisecond')
       on conflict (key) do update set
         hits = case when l.reset_at <= clock_timestamp() then 1 else l.hits + 1 end,
         reset_at = case when l.reset_at <= clock_timestamp() then excluded.reset_at else l.reset_at end
       returning hits, reset_at`,
      [this.prefix + key, this.windowMs],
    );
    const now = Date.now();
    if (now - lastPrune > PRUNE_EVERY_MS) {
      lastPrune = now;
      pool.query(`delete from request_limits where reset_at < clock_timestamp() - interval '1 minute'`).catch(() => undefined);
    }
    return { totalHits: rows[0]!.hits, resetTime: rows[0]!.reset_at };
  }

  async decrement(key: string) {
    await pool.query(`update request_limits set hits = greatest(hits - 1, 0) where key = $1 and reset_at > clock_timestamp()`, [this.prefix + key]);
  }

  async resetKey(key: string) {
    await pool.query(`delete from request_limits where key = $1`, [this.prefix + key]);
  }
}
