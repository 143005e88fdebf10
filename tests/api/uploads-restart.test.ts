import { spawn, type ChildProcess } from "node:child_process";
import { createServer } from "node:net";
import { existsSync, readFileSync } from "node:fs";
import { once } from "node:events";
import { demoMooringDefaults, mooringCsv } from "../../shared/demo/generate";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { db } from "../../server/db/client";
import { uploads } from "../../server/db/schema";
import { pathForKey, tusPartKey } from "../../server/lib/file-store";
import { makeProjectWithRoles } from "../helpers/api";
import { idFromUrl, makeDataset, sha256, tusUpload } from "../helpers/uploads";

/** A free loopback port. */
function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = createServer().listen(0, "127.0.0.1", () => {
      const p = (s.address() as { port: number }).port;
      s.close(() => resolve(p));
    });
  });
}

/** Starts the real API process (as in production: node --import tsx server/index.ts) on the test database. */
async function startApi(port: number, extraEnv: Record<string, string> = {}): Promise<ChildProcess> {
  const child = spawn(process.execPath, ["--import", "tsx", "server/index.ts"], { env: { ...process.env, PORT: String(port), HOST: "127.0.0.1", ...extraEnv }, stdio: "ignore" });
  const until = Date.now() + 30_000;
  while (Date.now() < until) {
    try {
      if ((await fetch(`http://127.0.0.1:${port}/api/health`)).ok) return child;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 150));
  }
  child.kill("SIGKILL");
  throw new Error("the API process did not start");
}

const children: ChildProcess[] = [];
let ctx: Awaited<ReturnType<typeof makeProjectWithRoles>>;
let ds: Awaited<ReturnType<typeof makeDataset>>;
beforeAll(async () => {
  ctx = await makeProjectWithRoles();
  ds = await makeDataset(ctx.projectId, ctx.users.contributor);
});
afterAll(() => {
  for (const c of children) if (c.exitCode === null) c.kill("SIGKILL");
});

describe("an upload survives a killed API process", () => {
  test("SIGKILL mid-upload, restart, resume: the stored SHA-256 equals the source's", async () => {
    const port = await freePort();
    const base = `http://127.0.0.1:${port}`;
    // ~12 MB of the invented demo mooring (shared/demo).
    const data = Buffer.from([...mooringCsv({ ...demoMooringDefaults, intervalS: 1, durationS: 180_000 })].join(""));
    let api = await startApi(port);
    children.push(api);
    let killedAt = 0;
    const first = await new Promise<Awaited<ReturnType<typeof tusUpload>>>((resolve) => {
      void tusUpload(base, ctx.users.contributor.cookie, data, {
        datasetId: ds.datasetId,
        chunkSize: 1 << 20,
        onChunk: (sent) => {
          if (sent >= 5 << 20 && !killedAt) {
            killedAt = sent;
            api.kill("SIGKILL");
          }
        },
      }).then(resolve);
    });
    expect(first.ok).toBe(false);
    expect(killedAt).toBeGreaterThanOrEqual(5 << 20);
    if (api.exitCode === null && api.signalCode === null) await once(api, "exit");

    api = await startApi(port);
    children.push(api);
    const head = await fetch(`${base}/api/uploads/${idFromUrl(first.url)}`, { method: "HEAD", headers: { cookie: ctx.users.contributor.cookie, "Tus-Resumable": "1.0.0" } });
    expect(head.status).toBe(200);
    const offset = Number(head.headers.get("upload-offset"));
    expect(offset).toBeGreaterThanOrEqual(5 << 20);

    const second = await tusUpload(base, ctx.users.contributor.cookie, data, { datasetId: ds.datasetId, chunkSize: 1 << 20, uploadUrl: first.url! });
    expect(second.ok).toBe(true);
    const [row] = await db.select().from(uploads).where(eq(uploads.id, idFromUrl(first.url)));
    expect(row?.sha256).toBe(sha256(data));
    expect(sha256(readFileSync(pathForKey(row!.storageKey)))).toBe(sha256(data));
    api.kill("SIGTERM");
  });
});

describe("configured limits", () => {
  test("an upload above UPLOAD_MAX_BYTES is refused with 413 and the limit", async () => {
    const port = await freePort();
    const api = await startApi(port, { UPLOAD_MAX_BYTES: "1000" });
    children.push(api);
    const r = await tusUpload(`http://127.0.0.1:${port}`, ctx.users.contributor.cookie, Buffer.alloc(2000, 49), { datasetId: ds.datasetId });
    expect(r.status).toBe(413);
    expect(r.body).toContain("larger than the upload limit of 1 kB");
    api.kill("SIGTERM");
  });
});

describe("unfinished uploads expire", () => {
  test("an abandoned upload's part is deleted after UPLOAD_EXPIRY_HOURS and it can no longer be resumed", async () => {
    const port = await freePort();
    const base = `http://127.0.0.1:${port}`;
    // 0.0005 h = 1.8 s; the sweep runs every second.
    const api = await startApi(port, { UPLOAD_EXPIRY_HOURS: "0.0005", UPLOAD_CLEANUP_INTERVAL_S: "1" });
    children.push(api);
    const data = Buffer.from([...mooringCsv({ ...demoMooringDefaults, intervalS: 1, durationS: 40_000 })].join(""));
    const first = await tusUpload(base, ctx.users.contributor.cookie, data, { datasetId: ds.datasetId, chunkSize: 1 << 20, stopAfterBytes: 1 << 20 });
    const id = idFromUrl(first.url);
    const part = pathForKey(tusPartKey(id));
    expect(existsSync(part)).toBe(true);
    const until = Date.now() + 15_000;
    while (existsSync(part) && Date.now() < until) await new Promise((r) => setTimeout(r, 250));
    expect(existsSync(part)).toBe(false);
    expect(existsSync(`${part}.json`)).toBe(false);
    const head = await fetch(`${base}/api/uploads/${id}`, { method: "HEAD", headers: { cookie: ctx.users.contributor.cookie, "Tus-Resumable": "1.0.0" } });
    expect([404, 410]).toContain(head.status);
    api.kill("SIGTERM");
  });
});
