import { z } from "zod";
import { idSchema } from "@shared/schemas/common";
import { qcSettingsSchema } from "@shared/schemas/qc-settings";
import { derivedVariables, measuredVariables } from "@shared/vocabulary";
import { pool } from "../db/client";
import { logger } from "../lib/logger";
import { summariseVersion } from "../pipeline/build";
import { writePlotSeries } from "../pipeline/plot-series";
import type { JobDefinition } from "./index";
import { enqueue } from "./queue";

/** Recomputes a built version's statistics, coverage, gaps and plot buckets from its records (records untouched). */
export const REBUILD_SUMMARIES = "rebuild-summaries";
const payloadSchema = z.object({ versionId: idSchema });
const known = new Set<string>([...measuredVariables, ...derivedVariables]);

export function enqueueRebuildSummaries(versionId: string) {
  return enqueue(REBUILD_SUMMARIES, { versionId }, { retryLimit: 3, retryDelay: 5 });
}

/** Idempotent: one transaction replaces the version's summary and plot series. */
export async function rebuildSummaries(versionId: string): Promise<boolean> {
  const c = await pool.connect();
  try {
    await c.query("begin");
    const { rows } = await c.query(
      `select v.dataset_id, v.number, v.state, r.settings, r.counts from versions v join qc_runs r on r.version_id = v.id where v.id = $1 for update of v`,
      [versionId],
    );
    const v = rows[0];
    if (!v || ["draft", "processing", "failed"].includes(v.state) || !v.settings) {
      await c.query("rollback");
      return false;
    }
    const settings = qcSettingsSchema.parse(v.settings);
    const columns = Object.keys(v.counts?.flagCounts ?? {}).filter((k) => known.has(k));
    const s = await summariseVersion(c, v.dataset_id, v.number, columns, settings);
    await c.query(`update versions set summary = $2 where id = $1`, [versionId, s.summary()]);
    await writePlotSeries(c, versionId, s.plotSeries());
    await c.query("commit");
    return true;
  } catch (e) {
    await c.query("rollback").catch(() => undefined);
    throw e;
  } finally {
    c.release();
  }
}

export const rebuildSummariesJob: JobDefinition = {
  name: REBUILD_SUMMARIES,
  async register(boss) {
    return boss.work<{ versionId: string }>(REBUILD_SUMMARIES, { pollingIntervalSeconds: 1, batchSize: 1 }, async ([job]) => {
      const { versionId } = payloadSchema.parse(job!.data);
      logger.info({ versionId }, `[${REBUILD_SUMMARIES}][${job!.id}] start`);
      const done = await rebuildSummaries(versionId);
      logger.info({ versionId, done }, `[${REBUILD_SUMMARIES}][${job!.id}] finish`);
      return { done };
    });
  },
};
