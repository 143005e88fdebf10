/**
 * Bench part "pipeline" (issue 5), both sides in the same run on a private PostgreSQL cluster (.bench/pg):
 *  (a) baseline — papaparse parsing the month-at-1-Hz mooring CSV and COPY of its raw rows into a bare table,
 *      streamed, so parsing overlaps the COPY;
 *  (b) the real pipeline — a completed upload of the same file turned into a ready version by a real worker
 *      process (`node --import tsx server/worker.ts`), timed from the create call to state "ready".
 * Three rounds, each side once per round, alternating (baseline, build, baseline, build, …): on a shared machine one
 * lucky or unlucky run of either side would otherwise decide the ratio (as in the download part). baseline_s and
 * pipeline_s are the medians of the rounds, ratio the median of the rounds' pipeline/baseline ratios (goal ≤ 2);
 * worker_peak_rss_mb is the worker's VmHWM over all rounds (goal < 500). Each round's figures are logged.
 */
import { execFileSync } from "node:child_process";
import { once } from "node:events";
import { createReadStream, rmSync } from "node:fs";
import { join } from "node:path";
import { performance } from "node:perf_hooks";
import pg from "pg";
import { from as copyFrom } from "pg-copy-streams";
import { demoMooringColumnMap } from "../../shared/demo/generate";
import { parseDelimited } from "../../server/pipeline/read-csv";
import { benchUpload } from "./lib/month-version";
import { startBenchWorker } from "./lib/worker";
import type { BenchContext } from "./run";

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const ROUNDS = 3;

async function baseline(url: string, csv: string): Promise<{ rows: number; seconds: number }> {
  const c = new pg.Client({ connectionString: url });
  await c.connect();
  await c.query(`drop table if exists bench_raw`);
  await c.query(`create table bench_raw (time timestamptz, wspd float8, wdir float8, gust float8, airt float8, baro float8, rh float8, sst float8, cur_e float8, cur_n float8)`);
  const t0 = performance.now();
  const copy = c.query(copyFrom(`copy bench_raw from stdin with (format csv)`));
  const done = new Promise<void>((resolve, reject) => {
    copy.on("finish", resolve);
    copy.on("error", reject);
  });
  let carry = "";
  let header = true;
  let rows = 0;
  const send = async (text: string) => {
    const data = parseDelimited(text, ",");
    if (data.length && data[data.length - 1]!.length === 1 && data[data.length - 1]![0] === "") data.pop();
    const body = header ? data.slice(1) : data;
    header = false;
    rows += body.length;
    const out = body.map((r) => r.join(",")).join("\n") + "\n";
    if (!copy.write(out) && copy.writableLength > 32 << 20) await once(copy, "drain");
  };
  for await (const piece of createReadStream(csv, { encoding: "utf8", highWaterMark: 1 << 20 })) {
    carry += piece as string;
    const cut = carry.lastIndexOf("\n");
    if (cut < 0) continue;
    await send(carry.slice(0, cut + 1));
    carry = carry.slice(cut + 1);
  }
  if (carry) await send(carry);
  copy.end();
  await done;
  const seconds = (performance.now() - t0) / 1000;
  await c.query(`drop table bench_raw`);
  await c.end();
  return { rows, seconds };
}

export async function run(ctx: BenchContext) {
  const csv = await ctx.mooringCsv();
  const port = process.env.BENCH_PG_PORT ?? "55471";
  const dbName = "tauline_bench";
  execFileSync("bash", ["scripts/pg.sh", "start", join(ctx.dir, "pg"), port, "postgres"], { stdio: "inherit" });
  const admin = new pg.Client({ connectionString: `postgres://postgres@127.0.0.1:${port}/postgres` });
  await admin.connect();
  await admin.query(`drop database if exists ${dbName} with (force)`);
  await admin.query(`create database ${dbName}`);
  await admin.end();
  const url = `postgres://postgres@127.0.0.1:${port}/${dbName}`;
  const storage = join(ctx.dir, "storage");
  rmSync(storage, { recursive: true, force: true });
  Object.assign(process.env, { DATABASE_URL: url, STORAGE_DIR: storage, LOG_LEVEL: "warn" });
  const { db, pool } = await import("../../server/db/client");
  const { runMigrations } = await import("../../server/db/migrate");
  await runMigrations(db);

  const worker = await startBenchWorker();
  const { createVersion } = await import("../../server/services/versions");
  const { stopSender } = await import("../../server/jobs/queue");
  const rounds: { baseline: number; pipeline: number; rows: number }[] = [];
  let peakMb = NaN;
  try {
    for (let round = 1; round <= ROUNDS; round++) {
      ctx.log(`pipeline: round ${round}: baseline (papaparse + COPY of raw rows)`);
      const base = await baseline(url, csv);
      ctx.log(`pipeline: round ${round}: baseline ${base.rows} rows in ${base.seconds.toFixed(2)} s`);

      // A completed upload of the same file, as the upload endpoint leaves it, in a dataset of its own.
      const { userId, dataset, uploadId } = await benchUpload(pool, csv, { title: `Bench month ${round}`, role: "admin", coastlineDeg: 270 });
      ctx.log(`pipeline: round ${round}: building a version from the upload`);
      const t0 = performance.now();
      const v = await createVersion({ id: userId, name: "Bench", email: "bench@tauline.invalid", emailVerified: true, isAdmin: true }, dataset, {
        uploadId,
        columnMap: demoMooringColumnMap(),
        mode: "replace",
      });
      let state = "processing";
      while (state === "processing") {
        await sleep(25);
        state = (await pool.query(`select state from versions where id = $1`, [v.id])).rows[0].state;
      }
      const pipelineS = (performance.now() - t0) / 1000;
      const run = (await pool.query(`select rows_done, timings, error from qc_runs where version_id = $1`, [v.id])).rows[0];
      if (state !== "ready") throw new Error(`pipeline build ended ${state}: ${JSON.stringify(run.error)}`);
      const rows = Number(run.rows_done);
      ctx.log(`pipeline: round ${round}: ${rows} rows ready in ${pipelineS.toFixed(2)} s (ratio ${(pipelineS / base.seconds).toFixed(2)}; ${JSON.stringify(run.timings)})`);
      rounds.push({ baseline: base.seconds, pipeline: pipelineS, rows });
      // The next round's build starts from the same empty records table as this one did.
      await pool.query(`drop table records_${dataset.replace(/-/g, "")}_1`);
    }
  } finally {
    peakMb = worker.peakRssMb();
    await worker.stop();
    await stopSender();
  }
  ctx.log(`pipeline: worker peak RSS ${peakMb.toFixed(0)} MB`);
  const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
  const baselineS = median(rounds.map((r) => r.baseline));
  const pipelineS = median(rounds.map((r) => r.pipeline));
  const ratio = median(rounds.map((r) => r.pipeline / r.baseline));
  const rows = rounds[0]!.rows;
  await pool.end();
  return {
    rows,
    baseline_s: Number(baselineS.toFixed(2)),
    pipeline_s: Number(pipelineS.toFixed(2)),
    ratio: Number(ratio.toFixed(3)),
    worker_peak_rss_mb: Math.round(peakMb),
  };
}
