import { spawn, type ChildProcess } from "node:child_process";
import { createHash, randomUUID } from "node:crypto";
import { mkdirSync, writeFileSync } from "node:fs";
import { dirname } from "node:path";
import { eq, sql } from "drizzle-orm";
import { db, pool } from "../../server/db/client";
import { datasets, deployments, platforms, uploads, versions } from "../../server/db/schema";
import { pathForKey, uploadKey } from "../../server/lib/file-store";
import { demoMooringColumnMap, demoMooringDefaults, mooringCsv, type MooringOptions } from "../../shared/demo/generate";
import { columnSql } from "../../server/db/record-flags";

/** A mooring platform, deployment and dataset in a project (invented Merrow Shelf-style names). */
export async function makeMooringDataset(projectId: string, opts: { latitude?: number; longitude?: number; name?: string } = {}) {
  const tag = randomUUID().slice(0, 6);
  const [p] = await db.insert(platforms).values({ projectId, name: opts.name ?? `Merrow buoy ${tag}`, kind: "mooring" }).returning();
  const [d] = await db
    .insert(deployments)
    .values({
      platformId: p!.id,
      name: `Deployment ${tag}`,
      startTime: new Date("2026-01-01T00:00:00Z"),
      latitude: opts.latitude ?? 41.25,
      longitude: opts.longitude ?? -27.5,
      anemometerHeightM: 4,
      coastlineOffshoreBearingDeg: 270,
    })
    .returning();
  const [ds] = await db.insert(datasets).values({ projectId, deploymentId: d!.id, title: `Series ${tag}` }).returning();
  return { platformId: p!.id, deploymentId: d!.id, datasetId: ds!.id };
}

/** Writes a file into storage as a completed upload of `datasetId` (the tus endpoint's end state). */
export async function storeUpload(datasetId: string, uploaderId: string, text: string, name = "merrow-month.csv") {
  const id = randomUUID();
  const key = uploadKey(id);
  const path = pathForKey(key);
  mkdirSync(dirname(path), { recursive: true });
  writeFileSync(path, text);
  await db.insert(uploads).values({
    id,
    datasetId,
    uploaderId,
    originalName: name,
    storageKey: key,
    sizeBytes: Buffer.byteLength(text),
    sha256: createHash("sha256").update(text).digest("hex"),
  });
  return id;
}

/** The demo mooring as one CSV text. */
export function mooringText(opts: Partial<MooringOptions> = {}): string {
  return [...mooringCsv({ ...demoMooringDefaults, ...opts })].join("");
}

export const mooringMap = () => demoMooringColumnMap();

export interface WorkerHandle {
  proc: ChildProcess;
  output: () => string;
  /** SIGKILL: no graceful shutdown, as when a machine dies. */
  kill(): Promise<void>;
  stop(): Promise<void>;
}

/** Spawns a real worker process on the test database (`node --import tsx server/worker.ts`). */
export async function startWorker(env: Record<string, string> = {}): Promise<WorkerHandle> {
  const proc = spawn(process.execPath, ["--import", "tsx", "server/worker.ts"], {
    env: { ...process.env, LOG_LEVEL: "debug", BUILD_STALE_AFTER_S: "10", BUILD_MONITOR_EVERY_S: "1", ...env },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let out = "";
  proc.stdout!.on("data", (b) => (out += b));
  proc.stderr!.on("data", (b) => (out += b));
  const exited = new Promise<void>((r) => proc.once("exit", () => r()));
  const until = Date.now() + 30_000;
  while (!out.includes("worker ready")) {
    if (proc.exitCode !== null) throw new Error(`worker exited: ${out}`);
    if (Date.now() > until) throw new Error(`worker did not start: ${out}`);
    await new Promise((r) => setTimeout(r, 50));
  }
  return {
    proc,
    output: () => out,
    async kill() {
      if (proc.exitCode === null) proc.kill("SIGKILL");
      await exited;
    },
    async stop() {
      if (proc.exitCode === null) proc.kill("SIGTERM");
      await exited;
    },
  };
}

/** Polls a version until its state is one of `states`. */
export async function waitForVersion(id: string, states: string[], timeoutMs = 60_000) {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const [v] = await db.select().from(versions).where(eq(versions.id, id));
    if (v && states.includes(v.state)) return v;
    if (Date.now() > until) throw new Error(`version ${id} is ${v?.state}, expected ${states.join("/")}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** Rows a version sees, ordered by platform and time, with the given columns. */
export async function versionRows(datasetId: string, number: number, columns: string[]) {
  const cols = columns.map((c) => columnSql(c)).join(", ");
  const r = await pool.query(
    `select platform, extract(epoch from time)::float8 as t${cols ? `, ${cols}` : ""} from records
      where dataset_id = $1 and valid_from <= $2 and (valid_to is null or valid_to > $2) order by platform, time`,
    [datasetId, number],
  );
  return r.rows as Record<string, number | string | null>[];
}

export async function countRows(datasetId: string) {
  const r = await db.execute<{ n: number }>(sql`select count(*)::int as n from records where dataset_id = ${datasetId}`);
  return r.rows[0]!.n;
}

/** A version row with its QC run in a given state, straight in the database (for access tests). */
export async function makeBuildVersion(projectId: string, uploaderId: string, state: "processing" | "ready" | "failed", runState: "queued" | "succeeded" | "failed") {
  const { datasetId } = await makeMooringDataset(projectId);
  const uploadId = await storeUpload(datasetId, uploaderId, "time,wspd\n2026-10-01T00:00:00Z,5\n");
  const [v] = await db.insert(versions).values({ datasetId, number: 1, state, uploadId, createdBy: uploaderId }).returning();
  await pool.query(`insert into qc_runs (version_id, mode, column_map, state) values ($1, 'replace', $2, $3)`, [v!.id, JSON.stringify(mooringMap()), runState]);
  return { datasetId, versionId: v!.id, uploadId };
}
