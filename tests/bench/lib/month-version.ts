/**
 * The bench's month-at-1-Hz version, shared by the parts that read one (plot, download): its own database on the
 * bench cluster (.bench/pg), built once through the pipeline's own `buildVersion` (the code the worker runs) and
 * reused while it is still there; plus an admin session on an app (admins read every version).
 */
import { execFileSync } from "node:child_process";
import { randomUUID } from "node:crypto";
import { linkSync, mkdirSync, statSync } from "node:fs";
import { dirname, join } from "node:path";
import pg from "pg";
import { demoMooringColumnMap, demoMooringDefaults } from "../../../shared/demo/generate";

const log = (m: string) => process.stderr.write(`[bench] month version: ${m}\n`);

/** The bench database and its month version, built once through the pipeline when absent. */
export async function monthVersion(dir: string) {
  const port = process.env.BENCH_PG_PORT ?? "55471";
  const dbName = "tauline_bench_plot";
  execFileSync("bash", ["scripts/pg.sh", "start", join(dir, "pg"), port, "postgres"], { stdio: "inherit" });
  const admin = new pg.Client({ connectionString: `postgres://postgres@127.0.0.1:${port}/postgres` });
  await admin.connect();
  if (!(await admin.query(`select 1 from pg_database where datname = $1`, [dbName])).rowCount) await admin.query(`create database ${dbName}`);
  await admin.end();
  const url = `postgres://postgres@127.0.0.1:${port}/${dbName}`;
  Object.assign(process.env, { DATABASE_URL: url, STORAGE_DIR: join(dir, "storage-plot"), LOG_LEVEL: "warn", PUBLIC_URL: "http://127.0.0.1:3999", BETTER_AUTH_URL: "http://127.0.0.1:3999" });
  const { db, pool } = await import("../../../server/db/client");
  const { runMigrations } = await import("../../../server/db/migrate");
  await runMigrations(db);
  const find = () =>
    pool.query(`select v.id, v.dataset_id, v.number, (v.summary->>'rows')::int as rows from versions v join datasets d on d.id = v.dataset_id where d.title = 'Bench plot month' and v.state = 'ready'`);
  let version = (await find()).rows[0];
  if (!version) {
    const csv = join(dir, `mooring-1hz-${demoMooringDefaults.seed}-${31 * 86400}.csv`);
    const { userId, dataset, uploadId } = await benchUpload(pool, csv, { title: "Bench plot month", role: "user" });
    const v = (await pool.query(`insert into versions (dataset_id, number, state, upload_id, created_by) values ($1, 1, 'processing', $2, $3) returning id`, [dataset, uploadId, userId])).rows[0];
    await pool.query(`insert into qc_runs (version_id, mode, column_map) values ($1, 'replace', $2)`, [v.id, JSON.stringify(demoMooringColumnMap())]);
    log("building the month-at-1-Hz version (once; later runs reuse it)");
    const { buildVersion } = await import("../../../server/pipeline/build");
    if ((await buildVersion(v.id)) !== "built") throw new Error("bench: the month version did not build");
    await pool.query(`vacuum analyze records`);
    version = (await find()).rows[0];
  }
  return { version: version as { id: string; dataset_id: string; number: number; rows: number }, pool };
}

/**
 * A stored upload of `csv` (hard-linked, as the upload endpoint leaves a finished file) in a fresh bench project with
 * a platform, a deployment at the demo mooring's position and a dataset titled `title`.
 */
export async function benchUpload(pool: pg.Pool, csv: string, opts: { title: string; role: "user" | "admin"; coastlineDeg?: number }) {
  const o = demoMooringDefaults;
  const tag = randomUUID().slice(0, 8);
  const userId = randomUUID();
  await pool.query(`insert into "user" (id, name, email, email_verified, role) values ($1, 'Bench data manager', $2, true, $3)`, [userId, `bench-${tag}@tauline.invalid`, opts.role]);
  const project = (await pool.query(`insert into projects (slug, name) values ($1, 'Merrow Shelf bench') returning id`, [`bench-${tag}`])).rows[0].id;
  const platform = (await pool.query(`insert into platforms (project_id, name, kind) values ($1, 'Merrow bench buoy', 'mooring') returning id`, [project])).rows[0].id;
  const deployment = (
    await pool.query(
      `insert into deployments (platform_id, name, start_time, latitude, longitude, anemometer_height_m, coastline_offshore_bearing_deg) values ($1, 'B-1', to_timestamp($2), $3, $4, 4, $5) returning id`,
      [platform, o.start, o.latitude, o.longitude, opts.coastlineDeg ?? null],
    )
  ).rows[0].id;
  const dataset = (await pool.query(`insert into datasets (project_id, deployment_id, title) values ($1, $2, $3) returning id`, [project, deployment, opts.title])).rows[0].id;
  const { uploadKey, pathForKey } = await import("../../../server/lib/file-store");
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
  return { userId, dataset, uploadId };
}

/** An admin session on the app (admins may read every version). */
export async function adminCookie(base: string, pool: pg.Pool) {
  const origin = process.env.PUBLIC_URL!;
  const email = `bench-${randomUUID().slice(0, 8)}@tauline.invalid`;
  const password = "bench-reader-password-2026";
  const up = await fetch(`${base}/api/auth/sign-up/email`, { method: "POST", headers: { "content-type": "application/json", origin }, body: JSON.stringify({ name: "Bench reader", email, password }) });
  if (!up.ok) throw new Error(`sign-up ${up.status}`);
  await pool.query(`update "user" set role = 'admin', email_verified = true where email = $1`, [email]);
  const res = await fetch(`${base}/api/auth/sign-in/email`, { method: "POST", headers: { "content-type": "application/json", origin }, body: JSON.stringify({ email, password }) });
  return res.headers.getSetCookie().map((c) => c.split(";")[0]).join("; ");
}

