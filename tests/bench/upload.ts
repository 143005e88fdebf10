/**
 * Bench part "upload" (issue 4): a ~250 MB demo mooring CSV (1 Hz, 39 days; generated once into .bench) sent to
 * the real app on loopback twice over: through tus (/api/uploads, tus-js-client, 50 MB parts as the browser sends
 * them, every request authenticated, SHA-256 computed while the bytes land, the upload recorded in PostgreSQL) and as
 * one plain streamed HTTP PUT to a bench-only route on the same server that also writes the file and computes its
 * SHA-256 (so both sides do the same disk and hashing work). The client runs in its own process, as a browser would.
 * Each is run three times (PUT, tus, tus, PUT, PUT, tus) after flushing dirty pages, and the fastest run of each counts. MB = 10^6 bytes.
 * BENCH_UPLOAD_STORAGE puts the stored files elsewhere (e.g. /dev/shm, to take the disk out of the comparison);
 * BENCH_UPLOAD_CHUNK changes the tus part size. Figures: tus_mb_per_s, put_mb_per_s, ratio = tus / put (goal ≥ 0.8).
 */
import { execFileSync, spawn } from "node:child_process";
import { createHash, randomUUID } from "node:crypto";
import { once } from "node:events";
import { createWriteStream, existsSync, mkdirSync, renameSync, rmSync, statSync } from "node:fs";
import type { AddressInfo } from "node:net";
import { join } from "node:path";
import { Transform } from "node:stream";
import { pipeline } from "node:stream/promises";
import pg from "pg";
import { mooringCsv } from "../../shared/demo/generate";
import { startBenchWorker } from "./lib/worker";
import type { BenchContext } from "./run";

const CHUNK = Number(process.env.BENCH_UPLOAD_CHUNK ?? 50 * 1024 * 1024);
const ROUNDS = 3;

/** The demo mooring at 1 Hz for 39 days: ~250 MB, the size of a month of a busier logger. Generated once. */
async function fileOf250Mb(ctx: BenchContext): Promise<string> {
  const path = join(ctx.dir, `mooring-1hz-${ctx.mooringOptions.seed}-39d.csv`);
  if (existsSync(path)) return path;
  ctx.log(`generating ${path} (once; later runs reuse it)`);
  const out = createWriteStream(`${path}.partial`);
  for (const piece of mooringCsv({ ...ctx.mooringOptions, durationS: 39 * 86400 }, 20_000)) if (!out.write(piece)) await once(out, "drain");
  out.end();
  await once(out, "finish");
  renameSync(`${path}.partial`, path);
  return path;
}

export async function run(ctx: BenchContext) {
  const csv = await fileOf250Mb(ctx);
  const size = statSync(csv).size;
  // Parts run in one process: when another part already configured the server modules, use its database.
  if (!process.env.DATABASE_URL) {
    const port = process.env.BENCH_PG_PORT ?? "55471";
    const dbName = "tauline_bench_upload";
    execFileSync("bash", ["scripts/pg.sh", "start", join(ctx.dir, "pg"), port, "postgres"], { stdio: "inherit" });
    const admin = new pg.Client({ connectionString: `postgres://postgres@127.0.0.1:${port}/postgres` });
    await admin.connect();
    if (!(await admin.query(`select 1 from pg_database where datname = $1`, [dbName])).rowCount) await admin.query(`create database ${dbName}`);
    await admin.end();
    Object.assign(process.env, {
      DATABASE_URL: `postgres://postgres@127.0.0.1:${port}/${dbName}`,
      STORAGE_DIR: process.env.BENCH_UPLOAD_STORAGE ?? join(ctx.dir, "storage-upload"),
      LOG_LEVEL: "warn",
      REQUIRE_EMAIL_VERIFICATION: "false",
      PUBLIC_URL: "http://127.0.0.1:3999",
      BETTER_AUTH_URL: "http://127.0.0.1:3999",
    });
  }
  const { db, pool } = await import("../../server/db/client");
  const { runMigrations } = await import("../../server/db/migrate");
  await runMigrations(db);
  const { createApp } = await import("../../server/app");
  const { storageDir, pathForKey, uploadKey } = await import("../../server/lib/file-store");

  // An admin (may upload to any dataset) and a dataset to upload to.
  const tag = randomUUID().slice(0, 8);
  const project = (await pool.query(`insert into projects (slug, name) values ($1, 'Merrow Shelf upload bench') returning id`, [`upload-bench-${tag}`])).rows[0].id;
  const dataset = (await pool.query(`insert into datasets (project_id, title) values ($1, $2) returning id`, [project, `Upload bench ${tag}`])).rows[0].id;

  let lastPutSha: (sha: string) => void = () => undefined;
  const app = createApp({ serveClient: false });
  // Bench-only baseline route (never mounted by the product): stream the body to disk, hashing it on the way.
  const putDir = join(storageDir("exports"), "..", "bench-put");
  mkdirSync(putDir, { recursive: true });
  app.put("/bench/put/:name", async (req, res) => {
    const hash = createHash("sha256");
    const tap = new Transform({
      transform(chunk: Buffer, _e, cb) {
        hash.update(chunk);
        cb(null, chunk);
      },
    });
    await pipeline(req, tap, createWriteStream(join(putDir, String(req.params.name).replace(/[^a-z0-9-]/g, ""))));
    const sha = hash.digest("hex");
    lastPutSha(sha);
    res.json({ sha256: sha });
  });
  const server = app.listen(0, "127.0.0.1");
  await new Promise((r) => server.once("listening", r));
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const origin = process.env.PUBLIC_URL!;
  const email = `bench-uploader-${tag}@tauline.invalid`;
  const password = "bench-uploader-password-2026";
  const up = await fetch(`${base}/api/auth/sign-up/email`, { method: "POST", headers: { "content-type": "application/json", origin }, body: JSON.stringify({ name: "Bench uploader", email, password }) });
  if (!up.ok) throw new Error(`upload bench: sign-up ${up.status} ${await up.text()}`);
  await pool.query(`update "user" set role = 'admin', email_verified = true where email = $1`, [email]);
  const signIn = await fetch(`${base}/api/auth/sign-in/email`, { method: "POST", headers: { "content-type": "application/json", origin }, body: JSON.stringify({ email, password }) });
  const cookie = signIn.headers.getSetCookie().map((c) => c.split(";")[0]).join("; ");

  const viaPut = async (): Promise<{ s: number; sha: string }> => {
    const name = `put-${randomUUID()}`;
    let sha = "";
    lastPutSha = (s) => (sha = s);
    const r = await runAsync(["put", `${base}/bench/put/${name}`, csv]);
    rmSync(join(putDir, name), { force: true });
    return { s: r.seconds, sha };
  };
  const viaTus = async (): Promise<{ s: number; id: string }> => {
    const r = await runAsync(["tus", `${base}/api/uploads`, csv, cookie, dataset, String(CHUNK)]);
    return { s: r.seconds, id: r.url!.split("/").pop()! };
  };
  // The server runs in this process, so the client must not block its event loop: spawn asynchronously.
  const runAsync = (args: string[]) =>
    new Promise<{ seconds: number; url?: string }>((resolve, reject) => {
      execFileSync("sync");
      const child = spawn(process.execPath, ["--import", "tsx", "tests/bench/upload-client.ts", ...args], { stdio: ["ignore", "pipe", "inherit"] });
      let out = "";
      child.stdout.on("data", (d) => (out += d));
      child.on("exit", (code) => (code === 0 ? resolve(JSON.parse(out.trim().split("\n").pop()!)) : reject(new Error(`upload client exited ${code}`))));
    });

  /** Lets the background full-file scan of a tus upload finish so it does not slow the next measurement. */
  const settle = async (id: string) => {
    for (let i = 0; i < 600; i++) {
      const r = await pool.query(`select status from upload_inspections where upload_id = $1`, [id]);
      if (r.rows[0]?.status !== "checking") return;
      await new Promise((res) => setTimeout(res, 100));
    }
  };

  let put = Infinity;
  let tusBest = Infinity;
  let shaPut = "";
  let shaTus = "";
  // Full-file scans of finished tus uploads run on a worker, as in the product; each is let finish before the next
  // measurement (settle) so it does not share the CPU with it.
  const worker = await startBenchWorker();
  const ids: string[] = [];
  try {
    // Alternate which goes first, and flush dirty pages before each (the disk is shared), so neither side is favoured.
    for (let r = 0; r < ROUNDS * 2; r++) {
      if (r % 2 === 0 ? r % 4 === 0 : r % 4 === 3) {
        const p = await viaPut();
        put = Math.min(put, p.s);
        shaPut = p.sha;
        ctx.log(`upload: PUT ${(size / 1e6 / p.s).toFixed(0)} MB/s`);
      } else {
        const tu = await viaTus();
        tusBest = Math.min(tusBest, tu.s);
        ids.push(tu.id);
        shaTus = (await pool.query(`select sha256 from uploads where id = $1`, [tu.id])).rows[0]?.sha256 ?? "";
        ctx.log(`upload: tus ${(size / 1e6 / tu.s).toFixed(0)} MB/s`);
        const t0 = Date.now();
        await settle(tu.id);
        ctx.log(`upload: the worker's scan of the tus upload took ${((Date.now() - t0) / 1000).toFixed(1)} s after it finished`);
      }
    }
  } finally {
    await worker.stop();
    const { stopSender } = await import("../../server/jobs/queue");
    await stopSender();
    server.close();
    for (const id of ids) rmSync(pathForKey(uploadKey(id)), { force: true });
  }
  if (shaPut !== shaTus) throw new Error(`upload bench: SHA-256 differs between PUT (${shaPut}) and tus (${shaTus})`);
  const tusMbS = size / 1e6 / tusBest;
  const putMbS = size / 1e6 / put;
  return { file_mb: Number((size / 1e6).toFixed(1)), chunk_mb: CHUNK / 1e6, tus_mb_per_s: Number(tusMbS.toFixed(1)), put_mb_per_s: Number(putMbS.toFixed(1)), ratio: Number((tusMbS / putMbS).toFixed(3)) };
}
