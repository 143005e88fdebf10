import { afterAll, beforeAll, describe, expect, onTestFailed, test } from "vitest";
import { pool } from "../../server/db/client";
import { stopSender } from "../../server/jobs/queue";
import { as, makeProjectWithRoles } from "../helpers/api";
import { countRows, makeMooringDataset, mooringMap, mooringText, startWorker, storeUpload, waitForVersion, type WorkerHandle } from "../helpers/pipeline";

/**
 * Crash safety with real worker processes: a worker killed mid-build (SIGKILL, as when a machine dies) and a
 * database connection cut mid-build. Either way the job is retried and the version ends identical to an
 * uninterrupted build, with no duplicate rows.
 */
let roles: Awaited<ReturnType<typeof makeProjectWithRoles>>;
const workers: WorkerHandle[] = [];
const day = Date.UTC(2026, 9, 1) / 1000;
// Four days at 1 Hz: long enough to interrupt mid-stream (a build reports progress every 0.5 s and reads ~0.3 M
// records per second), short enough for a test.
const ROWS = 4 * 86400;
const text = mooringText({ start: day, durationS: ROWS, intervalS: 1 });
let reference = "";

/** When a crash test fails, the workers' own log lines are what tell why. */
function printWorkerLogs() {
  workers.forEach((w, i) => console.log(`worker ${i + 1} log (last 4000 characters):\n${w.output().slice(-4000)}`));
}

/** Every column of every row a dataset's head version sees, minus the dataset id, as one digest. */
async function digest(datasetId: string) {
  const r = await pool.query(
    `select md5(string_agg((to_jsonb(r) - 'dataset_id')::text, ';' order by r.platform, r.time)) as h, count(*)::int as n
       from records r where dataset_id = $1 and valid_to is null`,
    [datasetId],
  );
  return r.rows[0] as { h: string; n: number };
}

async function createBuild() {
  const { contributor } = roles.users;
  const { datasetId } = await makeMooringDataset(roles.projectId, { name: `Crash buoy ${Math.random().toString(36).slice(2, 8)}` });
  const uploadId = await storeUpload(datasetId, contributor.id, text);
  const res = await as(contributor.cookie).post(`/api/datasets/${datasetId}/versions`).send({ uploadId, columnMap: mooringMap(), mode: "replace" });
  expect(res.status).toBe(201);
  return { datasetId, versionId: res.body.id as string };
}

async function waitRunning(versionId: string) {
  const until = Date.now() + 60_000;
  for (;;) {
    const r = await pool.query(`select state, rows_done from qc_runs where version_id = $1`, [versionId]);
    if (r.rows[0]?.state === "running" && Number(r.rows[0].rows_done) > 5000) return;
    if (Date.now() > until) throw new Error(`build never got going: ${JSON.stringify(r.rows[0])}`);
    await new Promise((res) => setTimeout(res, 25));
  }
}

beforeAll(async () => {
  roles = await makeProjectWithRoles();
  workers.push(await startWorker());
  const ref = await createBuild();
  expect((await waitForVersion(ref.versionId, ["ready", "failed"], 120_000)).state).toBe("ready");
  reference = (await digest(ref.datasetId)).h;
}, 180_000);
afterAll(async () => {
  for (const w of workers) await w.stop();
  await stopSender();
});

describe("crash safety", () => {
  test("a killed worker's build is retried by another worker: identical result, no duplicate rows", async () => {
    onTestFailed(printWorkerLogs);
    const { datasetId, versionId } = await createBuild();
    await waitRunning(versionId);
    await workers[0]!.kill();
    // Nothing of the half-done build is visible.
    expect(await countRows(datasetId)).toBe(0);
    workers.push(await startWorker());
    expect((await waitForVersion(versionId, ["ready", "failed"], 150_000)).state).toBe("ready");
    const d = await digest(datasetId);
    expect(d.n).toBe(ROWS);
    expect(d.h).toBe(reference);
    expect(await countRows(datasetId)).toBe(ROWS);
    const run = await pool.query(`select attempt, state from qc_runs where version_id = $1`, [versionId]);
    expect(run.rows[0]).toMatchObject({ state: "succeeded" });
    expect(run.rows[0].attempt).toBeGreaterThanOrEqual(2);
  }, 240_000);

  test("losing the database connection mid-build fails the attempt cleanly and the retry completes", async () => {
    onTestFailed(printWorkerLogs);
    const { datasetId, versionId } = await createBuild();
    await waitRunning(versionId);
    const cut = await pool.query(`select pg_terminate_backend(pid) from pg_stat_activity where datname = current_database() and application_name = 'tauline-build'`);
    expect(cut.rowCount).toBe(1);
    expect((await waitForVersion(versionId, ["ready", "failed"], 150_000)).state).toBe("ready");
    const d = await digest(datasetId);
    expect(d.n).toBe(ROWS);
    expect(d.h).toBe(reference);
    const run = await pool.query(`select attempt from qc_runs where version_id = $1`, [versionId]);
    expect(run.rows[0].attempt).toBeGreaterThanOrEqual(2);
  }, 240_000);
});
