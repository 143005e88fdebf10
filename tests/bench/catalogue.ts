/**
 * Bench part "catalogue" (issue 8): the public catalogue and dataset landing pages under 50 concurrent clients
 * (autocannon, in a process of its own as real clients are), over HTTP against the real app and PostgreSQL. 300 invented released datasets (Merrow Shelf
 * scenario) are inserted into a fresh database; the clients cycle through plain, text, area, variable and
 * sorted searches and landing pages of random datasets. Figures: clients, rps, p95_ms, p99_ms (goal p95 < 50),
 * with p95 taken from every response's own latency; health_rps and health_p95_ms give the same load on the health
 * check just before, the floor the machine allows at that moment.
 */
import { execFileSync, spawn } from "node:child_process";
import { once } from "node:events";
import { randomUUID } from "node:crypto";
import type { AddressInfo } from "node:net";
import { join, resolve } from "node:path";
import pg from "pg";
import { seededRandom } from "../../shared/demo/generate";
import { RESULT_MARK, runChild } from "./download";
import type { BenchContext } from "./run";

const CLIENTS = 50;
const DURATION_S = 10;
const DATASETS = 300;

export function run(ctx: BenchContext) {
  return runChild(resolve("tests/bench/catalogue.ts"), ctx);
}

const log = (m: string) => process.stderr.write(`[bench] catalogue: ${m}\n`);
const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.ceil((p / 100) * s.length) - 1)] ?? NaN;
};

async function child() {
  const dir = process.env.BENCH_DIR!;
  const port = process.env.BENCH_PG_PORT ?? "55471";
  const dbName = "tauline_bench_catalogue";
  execFileSync("bash", ["scripts/pg.sh", "start", join(dir, "pg"), port, "postgres"], { stdio: "inherit" });
  const admin = new pg.Client({ connectionString: `postgres://postgres@127.0.0.1:${port}/postgres` });
  await admin.connect();
  await admin.query(`drop database if exists ${dbName} with (force)`);
  await admin.query(`create database ${dbName}`);
  await admin.end();
  Object.assign(process.env, {
    DATABASE_URL: `postgres://postgres@127.0.0.1:${port}/${dbName}`,
    STORAGE_DIR: join(dir, "storage-catalogue"),
    LOG_LEVEL: "warn",
    PUBLIC_URL: "http://127.0.0.1:3998",
    BETTER_AUTH_URL: "http://127.0.0.1:3998",
  });
  const { db, pool } = await import("../../server/db/client");
  const { runMigrations } = await import("../../server/db/migrate");
  await runMigrations(db);

  // Invented released datasets: moorings and drifters scattered over the shelf and beyond.
  const rand = seededRandom(11);
  const userId = randomUUID();
  await pool.query(`insert into "user" (id, name, email, email_verified, role) values ($1, 'Bench curator', 'bench-curator@tauline.invalid', true, 'user')`, [userId]);
  const project = (await pool.query(`insert into projects (slug, name) values ('merrow-bench', 'Merrow Shelf Observing Programme (bench)') returning id`)).rows[0].id;
  const varSets = [
    ["wind_speed", "wind_from_direction", "air_temperature", "magnitude_of_surface_downward_stress"],
    ["eastward_sea_water_velocity", "northward_sea_water_velocity", "sea_water_temperature"],
    ["latitude", "longitude", "wind_speed", "surface_eastward_sea_water_velocity"],
  ];
  const ids: string[] = [];
  for (let i = 0; i < DATASETS; i++) {
    const kind = i % 3 === 2 ? "drifter" : "mooring";
    const lat = 40 + rand() * 20;
    const lon = -30 + rand() * 25;
    const platform = (await pool.query(`insert into platforms (project_id, name, kind) values ($1, $2, $3) returning id`, [project, `Merrow ${kind} ${i}`, kind])).rows[0].id;
    const start = Date.parse("2025-01-01T00:00:00Z") + Math.floor(rand() * 500) * 86400_000;
    const deployment = (
      await pool.query(`insert into deployments (platform_id, name, start_time, latitude, longitude) values ($1, $2, $3, $4, $5) returning id`, [platform, `D-${i}`, new Date(start), lat, lon])
    ).rows[0].id;
    const dataset = (await pool.query(`insert into datasets (project_id, deployment_id, title, description) values ($1, $2, $3, 'Invented bench series.') returning id`, [project, deployment, `Merrow series ${i}`]))
      .rows[0].id;
    const variables = varSets[i % 3]!.map((v) => ({ variable: v, unit: "", count: 1000, min: v === "latitude" ? lat - 0.5 : v === "longitude" ? lon - 0.5 : 0, max: v === "latitude" ? lat + 0.5 : v === "longitude" ? lon + 0.5 : 1, mean: 0.5, std: 0.1, flags: [0, 990, 0, 5, 5] }));
    const summary = { rows: 1000, platforms: [], start: new Date(start).toISOString(), end: new Date(start + 30 * 86400_000).toISOString(), intervalS: 600, gaps: [], gapCount: 0, coverage: 1, variables };
    // As a release does it (database guards): an approved version, its release row, then the state, in one transaction.
    const tx = await pool.connect();
    await tx.query("begin");
    const version = (await tx.query(`insert into versions (dataset_id, number, state, created_by, summary) values ($1, 1, 'approved', $2, $3) returning id`, [dataset, userId, summary])).rows[0].id;
    await tx.query(
      `insert into releases (version_id, dataset_id, release_number, version_number, released_by, project_name, dataset_title, authors, citation, stable_url, licence)
       values ($1, $2, 1, 1, $3, 'Merrow Shelf Observing Programme (bench)', $4, '{Bench curator}', 'Bench curator (2026). Merrow series.', 'http://127.0.0.1:3998/releases/x', 'CC-BY-4.0')`,
      [version, dataset, userId, `Merrow series ${i}`],
    );
    await tx.query(`update versions set state = 'released', state_changed_at = now() where id = $1`, [version]);
    await tx.query("commit");
    tx.release();
    ids.push(dataset);
  }
  await pool.query("analyze");
  log(`${DATASETS} released datasets inserted`);

  const { createApp } = await import("../../server/app");
  const server = createApp({ serveClient: false }).listen(0, "127.0.0.1");
  await new Promise((r) => server.once("listening", r));
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const paths = [
    "/api/v1/catalogue",
    "/api/v1/catalogue?q=merrow%20wind&sort=title",
    "/api/v1/catalogue?bbox=-20,45,-10,55&kind=mooring",
    "/api/v1/catalogue?variables=wind_speed&from=2025-06-01T00:00:00Z&to=2025-07-01T00:00:00Z&page=2",
    ...Array.from({ length: 8 }, () => `/api/v1/datasets/${ids[Math.floor(rand() * ids.length)]}/landing`),
  ];
  for (const p of paths) {
    const r = await fetch(base + p);
    if (!r.ok) throw new Error(`${p}: ${r.status} ${await r.text()}`);
  }
  /** 50 clients for `seconds` over `list`, in a process of their own (tests/bench/load-client.ts). */
  const load = async (list: string[], seconds: number) => {
    const child = spawn(process.execPath, ["--import", "tsx", resolve("tests/bench/load-client.ts"), JSON.stringify({ base, paths: list, connections: CLIENTS, seconds })], { stdio: ["ignore", "pipe", "inherit"] });
    let out = "";
    child.stdout.on("data", (b) => (out += b));
    const [code] = (await once(child, "exit")) as [number | null];
    if (code !== 0) throw new Error(`load client exited with ${code}`);
    const r = JSON.parse(out.trim().split("\n").pop()!) as { rps: number; requests: number; non_2xx: number; errors: number; latencies: number[] };
    return { rps: r.rps, latencies: r.latencies, errors: r.non_2xx + r.errors };
  };
  // The same clients on the health check first: the floor this machine gives any request right now.
  const floor = await load(["/api/health"], 5);
  const result = await load(paths, DURATION_S);
  const { latencies, errors } = result;
  // Let requests still in flight finish before the pool goes.
  server.closeAllConnections();
  await new Promise((r) => server.close(r));
  await new Promise((r) => setTimeout(r, 500));
  await pool.end();
  const figures = {
    clients: CLIENTS,
    rps: Math.round(result.rps),
    p50_ms: Number(pct(latencies, 50).toFixed(1)),
    p95_ms: Number(pct(latencies, 95).toFixed(1)),
    p99_ms: Number(pct(latencies, 99).toFixed(1)),
    requests: latencies.length,
    non_2xx: errors,
    health_rps: Math.round(floor.rps),
    health_p95_ms: Number(pct(floor.latencies, 95).toFixed(1)),
  };
  log(JSON.stringify(figures));
  process.stdout.write(RESULT_MARK + JSON.stringify(figures) + "\n");
}

// Only when this file itself is the child (the catalogue part imports runChild from the download part).
if (process.argv.includes("--child") && process.argv[1]?.endsWith("catalogue.ts")) {
  child().then(
    () => process.exit(0),
    (e) => {
      process.stderr.write(`${e instanceof Error ? e.stack : e}\n`);
      process.exit(1);
    },
  );
}
