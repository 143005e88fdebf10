import { once } from "node:events";
import type pg from "pg";
import { from as copyFrom } from "pg-copy-streams";
import { copyHeader, copyTrailer, encodePlotSeriesRow, type PlotSeriesArrays } from "./copy-encoder";

/** Replaces a version's plot series with `rows`, in the caller's transaction, through one binary COPY. */
export async function writePlotSeries(client: pg.PoolClient, versionId: string, rows: Iterable<PlotSeriesArrays>): Promise<void> {
  await client.query(`delete from plot_series where version_id = $1`, [versionId]);
  const copy = client.query(copyFrom(`copy plot_series (version_id, platform, variable, step_s, t0, min, max, mean, n, worst_flag) from stdin with (format binary)`));
  const done = new Promise<void>((resolve, reject) => {
    copy.on("finish", resolve);
    copy.on("error", reject);
  });
  copy.write(copyHeader());
  // Hand each row to the socket before encoding the next, so PostgreSQL reads one while this process encodes another.
  for (const r of rows) if (!copy.write(encodePlotSeriesRow(versionId, r))) await once(copy, "drain");
  copy.end(copyTrailer());
  await done;
}
