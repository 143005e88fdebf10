import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import { randomUUID } from "node:crypto";
import { mkdtempSync, readdirSync, rmSync, symlinkSync, unlinkSync, writeFileSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { pool } from "../../server/db/client";
import { makeProjectWithRoles, ORIGIN } from "../helpers/api";
import { mooringText } from "../helpers/pipeline";
import { makeDataset } from "../helpers/uploads";

/**
 * Faults while Tauline runs, with real processes: storage that fails while a file arrives, and PostgreSQL restarted
 * under a running API. (An API process killed mid-upload is tests/api/uploads-restart.test.ts; a worker killed
 * mid-build is tests/api/pipeline-crash.test.ts.) PostgreSQL is restarted on a cluster of this file's own, never a
 * shared one.
 */

const children: ChildProcess[] = [];
let roles: Awaited<ReturnType<typeof makeProjectWithRoles>>;
beforeAll(async () => {
  roles = await makeProjectWithRoles();
});
afterAll(async () => {
  for (const c of children) if (c.exitCode === null) c.kill("SIGKILL");
});

function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = createServer().listen(0, "127.0.0.1", () => {
      const p = (s.address() as { port: number }).port;
      s.close(() => resolve(p));
    });
  });
}

/** The real API process (node --import tsx server/index.ts), as in production. */
async function startApi(env: Record<string, string>): Promise<{ proc: ChildProcess; base: string; output: () => string }> {
  const port = await freePort();
  const proc = spawn(process.execPath, ["--import", "tsx", "server/index.ts"], {
    env: { ...process.env, PORT: String(port), HOST: "127.0.0.1", LOG_LEVEL: "warn", ...env },
    stdio: ["ignore", "pipe", "pipe"],
  });
  children.push(proc);
  let out = "";
  proc.stdout!.on("data", (b) => (out += b));
  proc.stderr!.on("data", (b) => (out += b));
  const base = `http://127.0.0.1:${port}`;
  const until = Date.now() + 30_000;
  while (Date.now() < until) {
    if (proc.exitCode !== null) throw new Error(`the API exited: ${out}`);
    try {
      if ((await fetch(`${base}/api/health`)).ok) return { proc, base, output: () => out };
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 150));
  }
  throw new Error(`the API did not start: ${out}`);
}

describe("storage fails while a file arrives", () => {
  /** Creates an upload, makes its part a link to /dev/full (every write fails with ENOSPC), then sends the bytes. */
  test("a full disk: the upload is refused with a clear message and nothing is recorded", { timeout: 60_000 }, async () => {
    const storage = mkdtempSync(join(tmpdir(), "tauline-faults-"));
    const api = await startApi({ STORAGE_DIR: storage });
    try {
      const { contributor } = roles.users;
      const ds = await makeDataset(roles.projectId, contributor);
      const data = Buffer.from(mooringText({ durationS: 86400, intervalS: 60 }));
      const b64 = (s: string) => Buffer.from(s).toString("base64");
      const headers = { Origin: ORIGIN, Cookie: contributor.cookie, "Tus-Resumable": "1.0.0" };
      const created = await fetch(`${api.base}/api/uploads`, {
        method: "POST",
        headers: { ...headers, "Upload-Length": String(data.length), "Upload-Metadata": `datasetId ${b64(ds.datasetId)},filename ${b64("full-disk.csv")}` },
      });
      expect(created.status).toBe(201);
      const url = new URL(created.headers.get("location")!, api.base);
      const id = url.pathname.split("/").pop()!;
      const part = readdirSync(join(storage, "tus")).find((f) => f.startsWith(id) && !f.endsWith(".json"))!;
      unlinkSync(join(storage, "tus", part));
      symlinkSync("/dev/full", join(storage, "tus", part));

      const before = (await pool.query(`select count(*)::int as n from uploads`)).rows[0].n;
      const res = await fetch(url, { method: "PATCH", headers: { ...headers, "Upload-Offset": "0", "Content-Type": "application/offset+octet-stream" }, body: new Uint8Array(data) });
      const body = await res.text();
      expect(res.status, body).toBe(507);
      expect(body).toMatch(/storage is full|no space/i);
      expect(body).not.toMatch(/ENOSPC|\/tmp\/|\n\s+at /);
      expect((await pool.query(`select count(*)::int as n from uploads`)).rows[0].n).toBe(before);
      expect((await fetch(`${api.base}/api/health`)).status).toBe(200);
    } finally {
      api.proc.kill("SIGTERM");
      rmSync(storage, { recursive: true, force: true });
    }
  });

  test("storage that cannot hold the finished file: refused with a clear message, no upload row, no file left", { timeout: 60_000 }, async () => {
    const storage = mkdtempSync(join(tmpdir(), "tauline-faults-"));
    // "uploads" is a plain file, so the finished file cannot be moved under its key (as on a broken mount).
    writeFileSync(join(storage, "uploads"), "not a folder");
    const api = await startApi({ STORAGE_DIR: storage });
    try {
      const { contributor } = roles.users;
      const ds = await makeDataset(roles.projectId, contributor);
      const data = Buffer.from(mooringText({ durationS: 3600, intervalS: 60 }));
      const b64 = (s: string) => Buffer.from(s).toString("base64");
      const headers = { Origin: ORIGIN, Cookie: contributor.cookie, "Tus-Resumable": "1.0.0" };
      const created = await fetch(`${api.base}/api/uploads`, {
        method: "POST",
        headers: { ...headers, "Upload-Length": String(data.length), "Upload-Metadata": `datasetId ${b64(ds.datasetId)},filename ${b64("broken-mount.csv")}` },
      });
      expect(created.status).toBe(201);
      const before = (await pool.query(`select count(*)::int as n from uploads`)).rows[0].n;
      const res = await fetch(new URL(created.headers.get("location")!, api.base), {
        method: "PATCH",
        headers: { ...headers, "Upload-Offset": "0", "Content-Type": "application/offset+octet-stream" },
        body: new Uint8Array(data),
      });
      const body = await res.text();
      expect([503, 507], body).toContain(res.status);
      expect(body).toMatch(/could not be stored|storage/i);
      expect(body).not.toMatch(/ENOTDIR|\/tmp\/|\n\s+at /);
      expect((await pool.query(`select count(*)::int as n from uploads`)).rows[0].n).toBe(before);
      expect(readdirSync(join(storage, "tus")).filter((f) => !f.endsWith(".json"))).toEqual([]);
      expect((await fetch(`${api.base}/api/health`)).status).toBe(200);
    } finally {
      api.proc.kill("SIGTERM");
      rmSync(storage, { recursive: true, force: true });
    }
  });
});

describe("PostgreSQL restarted under a running API", () => {
  // A cluster per run (parallel runs of the suite never share it), removed afterwards.
  const dir = `.pg-faults/${process.pid}`;
  let port = 0;
  let url = "";
  const pgctl = (...args: string[]) => execFileSync("bash", ["scripts/pg.sh", ...args], { stdio: "inherit" });

  beforeAll(async () => {
    port = await freePort();
    pgctl("start", dir, String(port), "tauline_faults");
    url = `postgres://postgres@127.0.0.1:${port}/tauline_faults`;
    const c = new pg.Client({ connectionString: `postgres://postgres@127.0.0.1:${port}/postgres` });
    await c.connect();
    await c.query(`drop database if exists tauline_faults with (force)`);
    await c.query(`create database tauline_faults`);
    await c.end();
    execFileSync(process.execPath, ["--import", "tsx", "server/db/migrate.ts"], { env: { ...process.env, DATABASE_URL: url, LOG_LEVEL: "warn" }, stdio: "inherit" });
  }, 120_000);
  afterAll(() => {
    pgctl("stop", dir);
    rmSync(dir, { recursive: true, force: true });
  });

  test("while it is down requests get 503 with a clear message; afterwards the same process answers again", { timeout: 120_000 }, async () => {
    const api = await startApi({ DATABASE_URL: url });
    try {
      const get = async (path: string, cookie?: string) => {
        const r = await fetch(`${api.base}${path}`, { headers: cookie ? { Cookie: cookie } : {} });
        return { status: r.status, body: await r.text() };
      };
      expect((await get("/api/v1/catalogue")).status).toBe(200);
      expect((await get(`/api/v1/datasets/${randomUUID()}`)).status).toBe(404);
      // A signed-in person on this API (verified straight in its database; the verification mail has its own test).
      const email = `faults-${randomUUID().slice(0, 8)}@tests.example`;
      const password = "correct-horse-battery-staple-7";
      const auth = (what: string, body: object) =>
        fetch(`${api.base}/api/auth/${what}`, { method: "POST", headers: { Origin: ORIGIN, "Content-Type": "application/json" }, body: JSON.stringify(body) });
      expect((await auth("sign-up/email", { name: "Fault Tester", email, password })).status).toBe(200);
      const c = new pg.Client({ connectionString: url });
      await c.connect();
      await c.query(`update "user" set email_verified = true where email = $1`, [email]);
      await c.end();
      const signedIn = await auth("sign-in/email", { email, password });
      expect(signedIn.status).toBe(200);
      const session = signedIn.headers.getSetCookie().map((x) => x.split(";")[0]).join("; ");
      expect((await get("/api/projects", session)).status).toBe(200);

      pgctl("stop", dir);
      // A signed-in page (the session is looked up in the database) and public ones.
      // (The catalogue list is served from a few seconds' memory, so a dataset page is asked for instead.)
      const somewhere = `/api/v1/datasets/${randomUUID()}`;
      for (const [path, cookie] of [[somewhere], ["/api/health"], ["/api/projects", session]] as [string, string?][]) {
        const r = await get(path, cookie);
        expect(r.status, `${path}: ${r.body}`).toBe(503);
        expect(r.body).toMatch(/database is not reachable/);
        expect(r.body).not.toMatch(/ECONNREFUSED|\n\s+at |node_modules/);
      }
      // Signing in needs the database too: the same clear answer, not a crash.
      const signIn = await fetch(`${api.base}/api/auth/sign-in/email`, {
        method: "POST",
        headers: { Origin: ORIGIN, "Content-Type": "application/json" },
        body: JSON.stringify({ email: "nobody@tests.example", password: "correct-horse-battery-staple-7" }),
      });
      const signInBody = await signIn.text();
      expect(signIn.status, signInBody).toBe(503);
      expect(signInBody).toMatch(/database is not reachable/);
      expect(api.proc.exitCode, "the API is still running").toBeNull();

      pgctl("start", dir, String(port), "tauline_faults");
      // The pool reconnects by itself: no restart of the API.
      let last = { status: 0, body: "" };
      const until = Date.now() + 30_000;
      while (Date.now() < until) {
        last = await get(`/api/v1/datasets/${randomUUID()}`);
        if (last.status === 404) last = await get("/api/v1/catalogue");
        if (last.status === 200) break;
        await new Promise((r) => setTimeout(r, 250));
      }
      expect(last.status, last.body).toBe(200);
      expect((await get("/api/health")).status).toBe(200);
      expect(api.proc.exitCode).toBeNull();
    } finally {
      api.proc.kill("SIGTERM");
    }
  });
});


