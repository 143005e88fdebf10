import { existsSync, readdirSync, readFileSync } from "node:fs";
import http from "node:http";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { mooringCsv, demoMooringDefaults } from "../../shared/demo/generate";
import { uploadDetailSchema } from "../../shared/schemas/uploads";
import { db } from "../../server/db/client";
import { auditLog, uploadInspections, uploads } from "../../server/db/schema";
import { pathForKey, storageDir, uploadKey } from "../../server/lib/file-store";
import { as, makeProjectWithRoles } from "../helpers/api";
import { startWorker } from "../helpers/pipeline";
import { idFromUrl, listenApp, makeDataset, sha256, tusUpload } from "../helpers/uploads";

let ctx: Awaited<ReturnType<typeof makeProjectWithRoles>>;
let app: Awaited<ReturnType<typeof listenApp>>;
let ds: Awaited<ReturnType<typeof makeDataset>>;
let otherDs: Awaited<ReturnType<typeof makeDataset>>;

/** A month-like demo mooring file of roughly `mb` megabytes (invented data, shared/demo). */
function demoCsv(rows: number): Buffer {
  return Buffer.from([...mooringCsv({ ...demoMooringDefaults, intervalS: 1, durationS: rows })].join(""));
}

beforeAll(async () => {
  ctx = await makeProjectWithRoles();
  app = await listenApp();
  ds = await makeDataset(ctx.projectId, ctx.users.contributor);
  // A dataset in the outsider's project, to forge metadata with.
  otherDs = await makeDataset(ctx.otherProject, ctx.users.outsider);
});
afterAll(async () => app.close());

const tusParts = () => readdirSync(storageDir("tus")).filter((f) => !f.endsWith(".json"));

describe("tus upload to /api/uploads", () => {
  test("an interrupted upload resumes from the server's offset and the recorded SHA-256 equals the source's", async () => {
    const data = demoCsv(60_000); // ~4 MB
    const first = await tusUpload(app.base, ctx.users.contributor.cookie, data, { datasetId: ds.datasetId, chunkSize: 1 << 20, stopAfterBytes: 2 << 20, filename: "M-1 March.csv" });
    expect(first.ok).toBe(false);
    const id = idFromUrl(first.url);
    const head = await fetch(`${app.base}/api/uploads/${id}`, { method: "HEAD", headers: { cookie: ctx.users.contributor.cookie, "Tus-Resumable": "1.0.0" } });
    const offset = Number(head.headers.get("upload-offset"));
    expect(offset).toBeGreaterThanOrEqual(2 << 20);
    expect(offset).toBeLessThan(data.length);

    const second = await tusUpload(app.base, ctx.users.contributor.cookie, data, { datasetId: ds.datasetId, chunkSize: 1 << 20, uploadUrl: first.url! });
    expect(second.ok).toBe(true);
    expect(idFromUrl(second.url)).toBe(id);

    const [row] = await db.select().from(uploads).where(eq(uploads.id, id));
    expect(row).toMatchObject({ datasetId: ds.datasetId, uploaderId: ctx.users.contributor.id, originalName: "M-1 March.csv", sizeBytes: data.length, sha256: sha256(data) });
    // The stored bytes are the source's, under the server-made key (the client's name is not in the path).
    expect(row!.storageKey).toBe(uploadKey(id));
    expect(sha256(readFileSync(pathForKey(row!.storageKey)))).toBe(sha256(data));
    const audit = await db.select().from(auditLog).where(eq(auditLog.entityId, id));
    expect(audit).toMatchObject([{ action: "upload.recorded", actorId: ctx.users.contributor.id }]);
    expect(tusParts()).not.toContain(id);

    const list = await as(ctx.users.curator.cookie).get(`/api/datasets/${ds.datasetId}/uploads`);
    expect(list.status).toBe(200);
    expect(list.body.items[0]).toMatchObject({ id, originalName: "M-1 March.csv", sizeBytes: data.length, sha256: sha256(data), uploaderName: "Contributor" });
  });

  test("a connection dropped in the middle of a PATCH keeps the bytes that arrived, and the upload resumes from there", async () => {
    const data = demoCsv(60_000); // ~4 MB
    const created = await fetch(`${app.base}/api/uploads`, {
      method: "POST",
      headers: { cookie: ctx.users.contributor.cookie, "Tus-Resumable": "1.0.0", "Upload-Length": String(data.length), "Upload-Metadata": `datasetId ${Buffer.from(ds.datasetId).toString("base64")}` },
    });
    expect(created.status).toBe(201);
    const location = new URL(created.headers.get("location")!, app.base);
    // One PATCH that announces the whole file, sends 3 MiB, then drops the connection.
    const sent = 3 << 20;
    await new Promise<void>((resolve) => {
      const req = http.request(location, {
        method: "PATCH",
        headers: { cookie: ctx.users.contributor.cookie, "Tus-Resumable": "1.0.0", "Upload-Offset": "0", "Content-Type": "application/offset+octet-stream", "Content-Length": String(data.length) },
      });
      req.on("error", () => resolve());
      req.on("response", () => resolve());
      req.write(data.subarray(0, sent), () => setTimeout(() => req.destroy(), 300));
    });
    const id = idFromUrl(location.href);
    let offset = 0;
    for (let i = 0; i < 50 && offset === 0; i++) {
      await new Promise((r) => setTimeout(r, 100));
      const head = await fetch(location, { method: "HEAD", headers: { cookie: ctx.users.contributor.cookie, "Tus-Resumable": "1.0.0" } });
      offset = Number(head.headers.get("upload-offset"));
    }
    expect(offset).toBeGreaterThan(0);
    expect(offset).toBeLessThanOrEqual(sent);
    const rest = await tusUpload(app.base, ctx.users.contributor.cookie, data, { datasetId: ds.datasetId, uploadUrl: location.href });
    expect(rest.ok).toBe(true);
    const [row] = await db.select().from(uploads).where(eq(uploads.id, id));
    expect(row).toMatchObject({ sizeBytes: data.length, sha256: sha256(data) });
  });

  test("a visitor is refused with 401 and an outsider with 403, on create and on continuing someone's upload", async () => {
    const data = Buffer.from("time,wspd,wdir\n2026-01-01T00:00:00Z,3.1,180\n");
    const visitor = await tusUpload(app.base, null, data, { datasetId: ds.datasetId });
    expect(visitor).toMatchObject({ ok: false, status: 401 });
    expect(visitor.body).toContain("Sign in to upload files.");
    const outsider = await tusUpload(app.base, ctx.users.outsider.cookie, data, { datasetId: ds.datasetId });
    expect(outsider).toMatchObject({ ok: false, status: 403 });

    const big = demoCsv(40_000);
    const started = await tusUpload(app.base, ctx.users.contributor.cookie, big, { datasetId: ds.datasetId, chunkSize: 1 << 20, stopAfterBytes: 1 << 20 });
    const id = idFromUrl(started.url);
    // Raw tus requests: tus-js-client would quietly start a fresh upload after a refused HEAD.
    const tusCall = (method: string, cookie: string | null) =>
      fetch(`${app.base}/api/uploads/${id}`, {
        method,
        headers: { ...(cookie ? { cookie } : {}), "Tus-Resumable": "1.0.0", ...(method === "PATCH" ? { "Upload-Offset": String(1 << 20), "Content-Type": "application/offset+octet-stream" } : {}) },
        body: method === "PATCH" ? new Uint8Array(big.subarray(1 << 20, (1 << 20) + 1000)) : undefined,
      });
    for (const method of ["HEAD", "PATCH", "DELETE"]) {
      expect((await tusCall(method, null)).status, `visitor ${method}`).toBe(401);
      expect((await tusCall(method, ctx.users.outsider.cookie)).status, `outsider ${method}`).toBe(403);
      // Even a curator of the same project cannot touch an upload someone else started.
      const cur = await tusCall(method, ctx.users.curator.cookie);
      expect(cur.status, `curator ${method}`).toBe(403);
      if (method === "PATCH") expect(await cur.text()).toContain("started by someone else");
    }
    const own = await tusCall("HEAD", ctx.users.contributor.cookie);
    expect(own.status).toBe(200);
    expect(Number(own.headers.get("upload-offset"))).toBeGreaterThanOrEqual(1 << 20);
  });

  test("a forged dataset id (another project's dataset) is refused with 403 and nothing is stored", async () => {
    const before = tusParts().length;
    const forged = await tusUpload(app.base, ctx.users.contributor.cookie, Buffer.from("time,wspd\n2026-01-01T00:00:00Z,3\n"), { datasetId: otherDs.datasetId });
    expect(forged).toMatchObject({ ok: false, status: 403 });
    const missing = await tusUpload(app.base, ctx.users.contributor.cookie, Buffer.from("a\n"), { datasetId: "not-a-uuid" });
    expect(missing).toMatchObject({ ok: false, status: 400 });
    expect(tusParts().length).toBe(before);
    expect(await db.select().from(uploads).where(eq(uploads.datasetId, otherDs.datasetId))).toEqual([]);
  });

  test("a curator and an admin may upload too", async () => {
    for (const who of [ctx.users.curator, ctx.users.admin]) {
      const r = await tusUpload(app.base, who.cookie, Buffer.from("time,wspd,wdir\n2026-01-01T00:00:00Z,3.1,180\n"), { datasetId: ds.datasetId });
      expect(r.ok).toBe(true);
    }
  });
});

describe("bad files get a clear answer and leave nothing stored", () => {
  const cases: [string, Buffer, number, RegExp][] = [
    ["a zero-byte file", Buffer.alloc(0), 400, /The file is empty \(0 bytes\)/],
    ["a header only", Buffer.from("time,wspd,wdir\n"), 422, /header \(line 1\) but no data lines/],
    ["binary bytes", Buffer.concat([Buffer.from("time,wspd\n2026-01-01T00:00:00Z,3\n"), Buffer.from([0, 1, 2, 3, 0xff])]), 422, /Line 3 holds a NUL byte/],
    ["UTF-16 with a byte-order mark", Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from("time,wspd\n", "utf16le")]), 422, /UTF-16 text \(little-endian/],
    ["Latin-1 text", Buffer.from("time,airt (\xb0C)\n2026-01-01T00:00:00Z,3\n", "latin1"), 422, /Line 1 holds byte 0xB0, which is not UTF-8/],
    ["a 5 MB single line", Buffer.from("1,".repeat(5 * (1 << 19))), 422, /Line 1 is longer than 1,048,576 characters/],
  ];
  for (const [name, data, status, message] of cases) {
    test(`${name}: ${status} with a message`, async () => {
      const before = tusParts().length;
      const [{ n }] = (await db.execute<{ n: number }>(`select count(*)::int as n from uploads`)).rows as [{ n: number }];
      const r = await tusUpload(app.base, ctx.users.contributor.cookie, data, { datasetId: ds.datasetId, chunkSize: 8 << 20 });
      expect(r.ok).toBe(false);
      expect(r.status).toBe(status);
      expect(r.body).toMatch(message);
      expect(tusParts().length).toBe(before);
      const [{ n: after }] = (await db.execute<{ n: number }>(`select count(*)::int as n from uploads`)).rows as [{ n: number }];
      expect(after).toBe(n);
    });
  }

  test("usable files with problems are recorded with warnings naming line and column", async () => {
    const text =
      "time,wspd,wdir\n" +
      "2026-01-01T00:00:00Z,3.1,180\n" +
      "2026-01-01T00:00:01Z,NaN,181\n" +
      "2026-01-01T00:00:02Z,-Infinity,182\n" +
      '2026-01-01T00:00:03Z,"1,234.5",183\n' +
      "2026-01-01T00:00:04Z,@cmd,184\n" +
      "2026-01-01T00:00:05Z,3.3\n" +
      "2026-01-01T02:00:06+02:00,3.3,185\n" +
      "2026-13-01T00:00:07Z,3.3,185\n";
    const r = await tusUpload(app.base, ctx.users.contributor.cookie, Buffer.from(text), { datasetId: ds.datasetId });
    expect(r.ok).toBe(true);
    const res = await as(ctx.users.contributor.cookie).get(`/api/uploads/${idFromUrl(r.url)}`);
    expect(res.status).toBe(200);
    const d = uploadDetailSchema.parse(res.body);
    expect(d.status).toBe("warnings");
    const by = Object.fromEntries(d.findings.map((f) => [f.code, f]));
    expect(by.ragged_rows).toMatchObject({ lines: [7], severity: "warning" });
    expect(by.nan_text).toMatchObject({ lines: [3], column: '"wspd"' });
    expect(by.infinity_text).toMatchObject({ lines: [4] });
    expect(by.thousands_separator).toMatchObject({ lines: [5] });
    expect(by.formula_like).toMatchObject({ lines: [6] });
    expect(by.time_unreadable).toMatchObject({ lines: [9], column: '"time"' });
    expect(by.time_mixed_zones!.message).toContain("+02:00");
  });

  test("a large file is scanned in the background by a worker, and its late problems reported", async () => {
    const data = Buffer.concat([demoCsv(30_000), Buffer.from("2026-03-01T00:00:00Z,1,2\n")]);
    const r = await tusUpload(app.base, ctx.users.contributor.cookie, data, { datasetId: ds.datasetId });
    expect(r.ok).toBe(true);
    const id = idFromUrl(r.url);
    const statusNow = async () => (await db.select().from(uploadInspections).where(eq(uploadInspections.uploadId, id)))[0]!.status;
    // Too large to scan when it finished, and no worker yet: the app server left the scan on the queue.
    await new Promise((res) => setTimeout(res, 500));
    expect(await statusNow()).toBe("checking");
    const worker = await startWorker();
    try {
      let status = "checking";
      for (let i = 0; i < 200 && status === "checking"; i++) {
        await new Promise((res) => setTimeout(res, 100));
        status = await statusNow();
      }
      expect(worker.output()).toMatch(new RegExp(`"uploadId":"${id}".*\\[inspect-upload\\]\\[[^\\]]+\\] scanned`));
    } finally {
      await worker.stop();
    }
    const d = uploadDetailSchema.parse((await as(ctx.users.contributor.cookie).get(`/api/uploads/${id}`)).body);
    expect(d.status).toBe("warnings");
    expect(d.dataLineCount).toBe(30_001);
    expect(d.findings.find((f) => f.code === "ragged_rows")).toMatchObject({ count: 1, lines: [30_002] });
  });
});

describe("GET /api/uploads/:id", () => {
  test("returns the sniffed dialect, the first 50 rows and a map suggested from the headers", async () => {
    const data = demoCsv(200);
    const r = await tusUpload(app.base, ctx.users.contributor.cookie, data, { datasetId: ds.datasetId });
    const res = await as(ctx.users.contributor.cookie).get(`/api/uploads/${idFromUrl(r.url)}`);
    const d = uploadDetailSchema.parse(res.body);
    expect(d.detected).toEqual({ delimiter: ",", decimalMark: ".", headerRow: 1, skipRows: 0, lineEnding: "lf" });
    expect(d.encoding).toBe("utf-8");
    expect(d.preview.header?.[0]).toBe("time");
    expect(d.preview.rows).toHaveLength(50);
    expect(d.preview.lines[0]).toBe(2);
    expect(d.platformId).toBe(ds.platformId);
    expect(d.suggestion?.source).toBe("headers");
  });

  test("re-reads the preview with the caller's dialect and answers 400 for a bad one", async () => {
    const text = "# export\ntime;wspd;wdir\n2026-01-01T00:00:00Z;3,5;180\n";
    const r = await tusUpload(app.base, ctx.users.contributor.cookie, Buffer.from(text), { datasetId: ds.datasetId });
    const id = idFromUrl(r.url);
    const d = uploadDetailSchema.parse((await as(ctx.users.contributor.cookie).get(`/api/uploads/${id}`)).body);
    expect(d.detected).toMatchObject({ delimiter: ";", decimalMark: ",", headerRow: 2 });
    const o = uploadDetailSchema.parse((await as(ctx.users.contributor.cookie).get(`/api/uploads/${id}?delimiter=comma&headerRow=0`)).body);
    expect(o.dialect).toMatchObject({ delimiter: ",", headerRow: 0 });
    expect(o.preview.rows[0]).toEqual(["# export"]);
    const bad = await as(ctx.users.contributor.cookie).get(`/api/uploads/${id}?delimiter=pipe&headerRow=-2`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.details).toEqual({ delimiter: ["delimiter is comma, semicolon, tab or space"], headerRow: ["headerRow is 0 (none) or a line number"] });
    expect((await as(ctx.users.outsider.cookie).get(`/api/uploads/${id}`)).status).toBe(403);
    expect((await as(null).get(`/api/uploads/${id}`)).status).toBe(401);
  });
});

test("the stored file of a finished upload exists under its key", () => {
  expect(existsSync(storageDir("uploads"))).toBe(true);
});
