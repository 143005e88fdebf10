import { spawn, type ChildProcess } from "node:child_process";
import { createServer } from "node:net";
import autocannon from "autocannon";
import { afterAll, beforeAll, expect, test } from "vitest";
import { stopSender } from "../../server/jobs/queue";
import { as } from "../helpers/api";
import { mooringMap, mooringText, startWorker, storeUpload, waitForVersion, type WorkerHandle } from "../helpers/pipeline";
import { releasedFixture } from "../helpers/released";
import { idFromUrl, makeDataset, sha256, tusUpload } from "../helpers/uploads";
import { pool } from "../../server/db/client";

/**
 * Load on loopback, bounded: 50 catalogue clients (autocannon, a fixed number of requests) while three uploads
 * arrive and one version builds, against the real API process and a real worker. Asserts that nothing failed; prints
 * the latency percentiles. No timing assertions here: speed figures live in `npm run bench`.
 */

const CLIENTS = 50;
const REQUESTS = 4000;

let api: ChildProcess;
let base = "";
let worker: WorkerHandle;
let fx: Awaited<ReturnType<typeof releasedFixture>>;

function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = createServer().listen(0, "127.0.0.1", () => {
      const p = (s.address() as { port: number }).port;
      s.close(() => resolve(p));
    });
  });
}

beforeAll(async () => {
  fx = await releasedFixture({ rows: 500, title: "Merrow load-test mooring" });
  await releasedFixture({ rows: 200, title: "Merrow load-test second mooring" });
  const port = await freePort();
  // The real API process, with a pool large enough for 50 clients plus uploads and the app's own work.
  api = spawn(process.execPath, ["--import", "tsx", "server/index.ts"], { env: { ...process.env, PORT: String(port), HOST: "127.0.0.1", LOG_LEVEL: "warn" }, stdio: "ignore" });
  base = `http://127.0.0.1:${port}`;
  const until = Date.now() + 30_000;
  for (;;) {
    try {
      if ((await fetch(`${base}/api/health`)).ok) break;
    } catch {
      /* not up yet */
    }
    if (Date.now() > until) throw new Error("the API did not start");
    await new Promise((r) => setTimeout(r, 150));
  }
  worker = await startWorker();
}, 120_000);

afterAll(async () => {
  api?.kill("SIGTERM");
  await worker?.stop();
  await stopSender();
});

const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))] ?? NaN;
};

test("50 catalogue clients, three uploads and one build at once: no errors; latency percentiles printed", { timeout: 300_000 }, async () => {
  const { contributor } = fx.users;
  const paths = [
    "/api/v1/catalogue",
    "/api/v1/catalogue?q=merrow%20load&sort=title",
    "/api/v1/catalogue?bbox=-30,40,-20,45&kind=mooring",
    "/api/v1/catalogue?variables=wind_speed",
    `/api/v1/datasets/${fx.datasetId}/landing`,
    `/api/v1/datasets/${fx.datasetId}`,
    `/api/v1/releases/${fx.releaseId}`,
  ];
  for (const p of paths) expect((await fetch(base + p)).status, p).toBe(200);

  // One build: a month of 1-minute data into a dataset of its own.
  const buildDs = await makeDataset(fx.projectId, contributor);
  const buildUpload = await storeUpload(buildDs.datasetId, contributor.id, mooringText({ start: Date.UTC(2026, 9, 1) / 1000, durationS: 31 * 86400, intervalS: 60 }));
  // Three uploads of about 3 MB each, to three datasets.
  const files = [0, 1, 2].map((i) => Buffer.from(mooringText({ start: Date.UTC(2026, 9, 1 + i) / 1000, durationS: 20 * 86400, intervalS: 60, seed: 7 + i })));
  const upDs = await Promise.all(files.map(() => makeDataset(fx.projectId, contributor)));

  const latencies: number[] = [];
  const statuses = new Map<number, number>();
  const catalogue = new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon(
      { url: base, connections: CLIENTS, amount: REQUESTS, timeout: 30, requests: paths.map((path) => ({ method: "GET" as const, path })) },
      (err, res) => (err ? reject(err) : resolve(res)),
    );
    instance.on("response", (_c, status, _b, ms) => {
      statuses.set(status, (statuses.get(status) ?? 0) + 1);
      latencies.push(ms);
    });
  });
  const build = (async () => {
    const res = await as(contributor.cookie).post(`/api/datasets/${buildDs.datasetId}/versions`).send({ uploadId: buildUpload, columnMap: mooringMap(), mode: "replace" });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    return waitForVersion(res.body.id, ["ready", "failed"], 240_000);
  })();
  const uploads = Promise.all(files.map((data, i) => tusUpload(base, contributor.cookie, data, { datasetId: upDs[i]!.datasetId, filename: `merrow-load-${i}.csv`, chunkSize: 1 << 20 })));

  const [result, version, outcomes] = await Promise.all([catalogue, build, uploads]);

  const line = {
    clients: CLIENTS,
    requests: latencies.length,
    p50_ms: Number(pct(latencies, 50).toFixed(1)),
    p95_ms: Number(pct(latencies, 95).toFixed(1)),
    p99_ms: Number(pct(latencies, 99).toFixed(1)),
    max_ms: Number(pct(latencies, 100).toFixed(1)),
    rps: Math.round(result.requests.average),
  };
  console.log(`catalogue under load: ${JSON.stringify(line)}`);

  expect(result.errors, "connection errors").toBe(0);
  expect(result.timeouts, "timeouts").toBe(0);
  expect(result.non2xx, `statuses ${JSON.stringify([...statuses])}`).toBe(0);
  expect(latencies.length).toBe(REQUESTS);
  expect(version.state).toBe("ready");
  for (const [i, o] of outcomes.entries()) {
    expect(o.ok, `upload ${i}: ${o.status} ${o.body}`).toBe(true);
    const { rows } = await pool.query(`select sha256, size_bytes from uploads where id = $1`, [idFromUrl(o.url)]);
    expect(rows[0].sha256).toBe(sha256(files[i]!));
    expect(Number(rows[0].size_bytes)).toBe(files[i]!.length);
  }
  // Still answering afterwards.
  expect((await fetch(`${base}/api/health`)).status).toBe(200);
});
