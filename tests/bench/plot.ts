/**
 * Bench part "plot" (issue 7): GET /api/versions/:id/plot over HTTP for 2,000-bucket windows of a version holding the
 * month-at-1-Hz demo mooring (~2.7 million rows), at several zoom levels (whole month → ten minutes), repeated at
 * random positions. The version is built once through the pipeline's own `buildVersion` (same code the worker runs)
 * into its own database on the bench cluster (.bench/pg) and reused by later runs while it is still there.
 * Figures: rows, p50_ms and p95_ms over all calls (goal p95 < 100), plus p95 per zoom level.
 */
import { execFileSync } from "node:child_process";
import { randomUUID } from "node:crypto";
import { linkSync, mkdirSync, statSync } from "node:fs";
import type { AddressInfo } from "node:net";
import { dirname, join } from "node:path";
import { performance } from "node:perf_hooks";
import pg from "pg";
import { demoMooringColumnMap, seededRandom } from "../../shared/demo/generate";
import type { BenchContext } from "./run";

const ZOOMS: [string, number][] = [
  ["month", 31 * 86400],
  ["week", 7 * 86400],
  ["day", 86400],
  ["6h", 6 * 3600],
  ["1h", 3600],
  ["10min", 600],
];
const CALLS_PER_ZOOM = 30;
const VARIABLES = "wind_speed,magnitude_of_surface_downward_stress";

const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.ceil((p / 100) * s.length) - 1)]!;
};

export async function run(ctx: BenchContext) {
  const csv = await ctx.mooringCsv();
  const port = process.env.BENCH_PG_PORT ?? "55471";
  const dbName = "tauline_bench_plot";
  execFileSync("bash", ["scripts/pg.sh", "start", join(ctx.dir, "pg"), port, "postgres"], { stdio: "inherit" });
  const admin = new pg.Client({ connectionString: `postgres://postgres@127.0.0.1:${port}/postgres` });
  await admin.connect();
  const exists = (await admin.query(`select 1 from pg_database where datname = $1`, [dbName])).rowCount;
  if (!exists) await admin.query(`create database ${dbName}`);
  await admin.end();
  const url = `postgres://postgres@127.0.0.1:${port}/${dbName}`;
  const storage = join(ctx.dir, "storage-plot");
  Object.assign(process.env, { DATABASE_URL: url, STORAGE_DIR: storage, LOG_LEVEL: "warn", PUBLIC_URL: "http://127.0.0.1:3999", BETTER_AUTH_URL: "http://127.0.0.1:3999" });
  const { db, pool } = await import("../../server/db/client");
  const { runMigrations } = await import("../../server/db/migrate");
  await runMigrations(db);

  // The version: reuse a ready one from an earlier run, else build it.
  const o = ctx.mooringOptions;
  let version = (await pool.query(`select v.id, (v.summary->>'rows')::int as rows from versions v join datasets d on d.id = v.dataset_id where d.title = 'Bench plot month' and v.state = 'ready'`)).rows[0];
  if (!version) {
    const tag = randomUUID().slice(0, 8);
    const userId = randomUUID();
    await pool.query(`insert into "user" (id, name, email, email_verified, role) values ($1, 'Bench builder', $2, true, 'user')`, [userId, `bench-build-${tag}@tauline.invalid`]);
    const project = (await pool.query(`insert into projects (slug, name) values ($1, 'Merrow Shelf plot bench') returning id`, [`plot-bench-${tag}`])).rows[0].id;
    const platform = (await pool.query(`insert into platforms (project_id, name, kind) values ($1, 'Merrow plot buoy', 'mooring') returning id`, [project])).rows[0].id;
    const deployment = (
      await pool.query(
        `insert into deployments (platform_id, name, start_time, latitude, longitude, anemometer_height_m) values ($1, 'P-1', to_timestamp($2), $3, $4, 4) returning id`,
        [platform, o.start, o.latitude, o.longitude],
      )
    ).rows[0].id;
    const dataset = (await pool.query(`insert into datasets (project_id, deployment_id, title) values ($1, $2, 'Bench plot month') returning id`, [project, deployment])).rows[0].id;
    const { uploadKey, pathForKey } = await import("../../server/lib/file-store");
    const uploadId = randomUUID();
    const key = uploadKey(uploadId);
    mkdirSync(dirname(pathForKey(key)), { recursive: true });
    linkSync(csv, pathForKey(key));
    await pool.query(`insert into uploads (id, dataset_id, uploader_id, original_name, storage_key, size_bytes, sha256) values ($1, $2, $3, 'merrow-month-1hz.csv', $4, $5, $6)`, [
      uploadId,
      dataset,
      userId,
      key,
      statSync(csv).size,
      "0".repeat(64),
    ]);
    const v = (await pool.query(`insert into versions (dataset_id, number, state, upload_id, created_by) values ($1, 1, 'processing', $2, $3) returning id`, [dataset, uploadId, userId])).rows[0];
    await pool.query(`insert into qc_runs (version_id, mode, column_map) values ($1, 'replace', $2)`, [v.id, JSON.stringify(demoMooringColumnMap())]);
    ctx.log("plot: building the month-at-1-Hz version through buildVersion (once; later runs reuse it)");
    const { buildVersion } = await import("../../server/pipeline/build");
    const t0 = performance.now();
    const outcome = await buildVersion(v.id);
    if (outcome !== "built") throw new Error(`plot bench: build ${outcome}`);
    ctx.log(`plot: built in ${((performance.now() - t0) / 1000).toFixed(1)} s`);
    await pool.query(`vacuum analyze records`);
    version = (await pool.query(`select id, (summary->>'rows')::int as rows from versions where id = $1`, [v.id])).rows[0];
  }

  // The real HTTP app, and an admin session (admins read every version).
  const { createApp } = await import("../../server/app");
  const app = createApp({ serveClient: false });
  const server = app.listen(0, "127.0.0.1");
  await new Promise((r) => server.once("listening", r));
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const origin = process.env.PUBLIC_URL!;
  const email = `bench-viewer-${randomUUID().slice(0, 8)}@tauline.invalid`;
  const password = "bench-viewer-password-2026";
  const up = await fetch(`${base}/api/auth/sign-up/email`, { method: "POST", headers: { "content-type": "application/json", origin }, body: JSON.stringify({ name: "Bench viewer", email, password }) });
  if (!up.ok) throw new Error(`plot bench: sign-up ${up.status} ${await up.text()}`);
  await pool.query(`update "user" set role = 'admin', email_verified = true where email = $1`, [email]);
  const signIn = await fetch(`${base}/api/auth/sign-in/email`, { method: "POST", headers: { "content-type": "application/json", origin }, body: JSON.stringify({ email, password }) });
  const cookie = signIn.headers.getSetCookie().map((c) => c.split(";")[0]).join("; ");

  const rand = seededRandom(7);
  const start = o.start;
  const end = o.start + o.durationS;
  const get = async (from: number, to: number) => {
    const t = performance.now();
    const res = await fetch(`${base}/api/versions/${version.id}/plot?variables=${VARIABLES}&buckets=2000&from=${new Date(from * 1000).toISOString()}&to=${new Date(to * 1000).toISOString()}`, {
      headers: { cookie },
    });
    const body = (await res.json()) as { series?: { t: number[] }[]; source?: string };
    const ms = performance.now() - t;
    if (!res.ok || !body.series?.length) throw new Error(`plot bench: ${res.status} ${JSON.stringify(body).slice(0, 300)}`);
    return { ms, source: body.source!, points: body.series[0]!.t.length };
  };
  await get(start, end); // warm-up: connections, plans
  const all: number[] = [];
  const figures: Record<string, number | string> = {};
  for (const [name, span] of ZOOMS) {
    const times: number[] = [];
    let source = "";
    let points = 0;
    for (let k = 0; k < CALLS_PER_ZOOM; k++) {
      const from = span >= end - start ? start : start + Math.floor(rand() * (end - start - span));
      const r = await get(from, from + span);
      times.push(r.ms);
      source = r.source;
      points = r.points;
    }
    all.push(...times);
    figures[`p95_ms_${name}`] = Number(pct(times, 95).toFixed(1));
    ctx.log(`plot: ${name}: p50 ${pct(times, 50).toFixed(1)} ms, p95 ${pct(times, 95).toFixed(1)} ms (${source}, ${points} buckets)`);
  }
  server.close();
  await pool.end();
  return { rows: version.rows, p50_ms: Number(pct(all, 50).toFixed(1)), p95_ms: Number(pct(all, 95).toFixed(1)), calls: all.length, ...figures };
}
