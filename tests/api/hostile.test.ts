import { existsSync, readdirSync } from "node:fs";
import { join, resolve } from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { pool } from "../../server/db/client";
import { pathForKey, storageDir, storageRoot, uploadKey } from "../../server/lib/file-store";
import { demoMooringColumnMap, demoMooringDefaults, mooringCsv } from "../../shared/demo/generate";
import { ORIGIN } from "../helpers/api";
import { releasedFixture } from "../helpers/released";
import { listenApp, makeDataset, storeTestUpload } from "../helpers/uploads";

/**
 * One table of hostile files and requests. Each row says what is sent, the status and the message a person gets
 * back, and what may be stored afterwards (nothing, or exactly one whole upload). After every row the server must
 * still answer its health check and no table may hold half of anything. Files are built in code from the invented
 * demo mooring (shared/demo), so nothing binary is committed.
 */

let fx: Awaited<ReturnType<typeof releasedFixture>>;
let app: Awaited<ReturnType<typeof listenApp>>;
let ds: Awaited<ReturnType<typeof makeDataset>>;
let otherDs: Awaited<ReturnType<typeof makeDataset>>;
let otherUpload: string;
let ownUpload: string;

beforeAll(async () => {
  fx = await releasedFixture({ rows: 120 });
  app = await listenApp();
  ds = await makeDataset(fx.projectId, fx.users.contributor);
  otherDs = await makeDataset(fx.otherProject, fx.users.outsider);
  otherUpload = await storeTestUpload(otherDs.datasetId, fx.users.outsider.id, "time,wspd\n2026-10-01T00:00:00Z,5\n");
  ownUpload = await storeTestUpload(ds.datasetId, fx.users.contributor.id, [...mooringCsv({ ...demoMooringDefaults, durationS: 6 * 3600, intervalS: 600 })].join(""));
});
afterAll(async () => app.close());

interface Reply {
  status: number;
  text: string;
}

const b64 = (s: string) => Buffer.from(s).toString("base64");

async function call(method: string, path: string, opts: { cookie?: string | null; headers?: Record<string, string>; body?: string | Buffer } = {}): Promise<Reply> {
  const cookie = opts.cookie === undefined ? fx.users.contributor.cookie : opts.cookie;
  const res = await fetch(`${app.base}${path}`, {
    method,
    headers: { Origin: ORIGIN, ...(cookie ? { Cookie: cookie } : {}), ...opts.headers },
    body: typeof opts.body === "string" || opts.body === undefined ? opts.body : new Uint8Array(opts.body),
  });
  return { status: res.status, text: await res.text() };
}

/** Only the tus create request (for rows that must be refused before any byte is stored). */
async function tus(data: Buffer, meta: Record<string, string> = {}, opts: { length?: string; cookie?: string | null } = {}): Promise<Reply & { id?: string }> {
  const metadata = Object.entries({ datasetId: ds.datasetId, filename: "logger-export.csv", ...meta })
    .map(([k, v]) => `${k} ${b64(v)}`)
    .join(",");
  const created = await call("POST", "/api/uploads", {
    cookie: opts.cookie,
    headers: { "Tus-Resumable": "1.0.0", "Upload-Length": opts.length ?? String(data.length), "Upload-Metadata": metadata },
  });
  return created;
}

/** A whole tus upload: create, then one PATCH with every byte (the create answer is returned when it refuses). */
async function tusWhole(data: Buffer, meta: Record<string, string> = {}): Promise<Reply & { id?: string }> {
  const metadata = Object.entries({ datasetId: ds.datasetId, filename: "logger-export.csv", ...meta })
    .map(([k, v]) => `${k} ${b64(v)}`)
    .join(",");
  const created = await fetch(`${app.base}/api/uploads`, {
    method: "POST",
    headers: { Origin: ORIGIN, Cookie: fx.users.contributor.cookie, "Tus-Resumable": "1.0.0", "Upload-Length": String(data.length), "Upload-Metadata": metadata },
  });
  if (created.status !== 201) return { status: created.status, text: await created.text() };
  const url = new URL(created.headers.get("location")!, app.base);
  const patched = await call("PATCH", url.pathname, { headers: { "Tus-Resumable": "1.0.0", "Upload-Offset": "0", "Content-Type": "application/offset+octet-stream" }, body: data });
  return { ...patched, id: url.pathname.split("/").pop() };
}

const demo = (hours: number) => [...mooringCsv({ ...demoMooringDefaults, durationS: hours * 3600, intervalS: 600 })].join("");
const versionsOf = (datasetId: string) => `/api/datasets/${datasetId}/versions`;
const json = { "Content-Type": "application/json" };

interface Row {
  name: string;
  send: () => Promise<Reply & { id?: string }>;
  status: number;
  message: RegExp;
  /** What may be stored afterwards: nothing at all, or one whole upload (a usable file with warnings). */
  stores?: "nothing" | "one upload";
  then?: (r: Reply & { id?: string }) => Promise<void>;
}

const table: Row[] = [
  // Bad files
  {
    name: "Windows-1252 bytes (curly quotes) in the header",
    send: () => tusWhole(Buffer.concat([Buffer.from("time,"), Buffer.from([0x93]), Buffer.from("wspd"), Buffer.from([0x94]), Buffer.from("\n2026-10-01T00:00:00Z,3\n")])),
    status: 422,
    message: /Line 1 holds byte 0x93, which is not UTF-8/,
  },
  {
    name: "a PNG image named .csv",
    send: () => tusWhole(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0x0d, 0x49, 0x48, 0x44, 0x52, 0, 0, 1, 0]), { filename: "photo.csv" }),
    status: 422,
    message: /NUL byte|not UTF-8|binary/,
  },
  {
    name: "a gzip archive named .csv",
    send: () => tusWhole(Buffer.from([0x1f, 0x8b, 0x08, 0x00, 0x00, 0x00, 0x00, 0x00, 0x00, 0x03, 0x4b, 0x4c, 0x4a, 0x06, 0x00]), { filename: "export.csv" }),
    status: 422,
    message: /NUL byte|not UTF-8|binary/,
  },
  {
    name: "a 2 MB header line",
    send: () => tusWhole(Buffer.from(`time,${"w".repeat(2 << 20)}\n2026-10-01T00:00:00Z,3\n`)),
    status: 422,
    message: /Line 1 is longer than 1,048,576 characters/,
  },
  {
    name: "ragged rows: every third data line is short",
    send: () =>
      tusWhole(
        Buffer.from(
          demo(6)
            .split("\n")
            .map((l, i) => (i > 0 && i % 3 === 0 && l ? l.split(",").slice(0, 3).join(",") : l))
            .join("\n"),
        ),
      ),
    status: 204,
    message: /^$/,
    stores: "one upload",
    then: async (r) => {
      const d = JSON.parse((await call("GET", `/api/uploads/${r.id}`)).text);
      const ragged = d.findings.find((f: { code: string }) => f.code === "ragged_rows");
      expect(ragged.message).toMatch(/line/i);
      expect(ragged.lines[0]).toBe(4);
    },
  },
  {
    name: "formula cells (=, +, -, @ at the start of a value)",
    send: () => tusWhole(Buffer.from("time,wspd,wdir\n2026-10-01T00:00:00Z,=HYPERLINK(\"x\"),180\n2026-10-01T00:10:00Z,@SUM(A1),181\n2026-10-01T00:20:00Z,3,182\n")),
    status: 204,
    message: /^$/,
    stores: "one upload",
    then: async (r) => {
      const d = JSON.parse((await call("GET", `/api/uploads/${r.id}`)).text);
      expect(d.findings.find((f: { code: string }) => f.code === "formula_like"), JSON.stringify(d.findings)).toMatchObject({ lines: [2, 3] });
    },
  },
  {
    name: "a path-traversal file name is kept as a label only",
    send: () => tusWhole(Buffer.from(demo(2)), { filename: "../../../../etc/cron.d/tauline\r\n.csv" }),
    status: 204,
    message: /^$/,
    stores: "one upload",
    then: async (r) => {
      const { rows } = await pool.query(`select original_name, storage_key from uploads where id = $1`, [r.id]);
      expect(rows[0].original_name).toBe("../../../../etc/cron.d/tauline.csv"); // control characters dropped
      expect(rows[0].storage_key).not.toContain("..");
      expect(resolve(storageRoot(), rows[0].storage_key).startsWith(resolve(storageRoot()))).toBe(true);
      expect(existsSync(join(storageRoot(), "..", "etc"))).toBe(false);
    },
  },
  {
    name: "an upload declared larger than the limit",
    send: () => tus(Buffer.alloc(0), {}, { length: String(6_000_000_000) }),
    status: 413,
    message: /5 GB/,
  },
  {
    name: "an Upload-Length that is not a number",
    send: () => tus(Buffer.alloc(0), {}, { length: "12; drop table uploads" }),
    status: 400,
    message: /./,
  },
  {
    name: "upload metadata without a dataset",
    send: () => tus(Buffer.from("x"), { datasetId: "" }),
    status: 400,
    message: /Say which dataset the file is for \(upload metadata datasetId\)/,
  },
  {
    name: "upload metadata with SQL in the dataset id",
    send: () => tus(Buffer.from("x"), { datasetId: "1' or '1'='1" }),
    status: 400,
    message: /upload metadata datasetId/,
  },
  {
    name: "forged upload metadata pointing at another project's dataset",
    send: () => tus(Buffer.from(demo(1)), { datasetId: otherDs.datasetId }),
    status: 403,
    message: /./,
  },
  {
    name: "a visitor's upload",
    send: () => tus(Buffer.from(demo(1)), {}, { cookie: null }),
    status: 401,
    message: /Sign in/,
  },
  // Bad JSON bodies
  {
    name: "malformed JSON when building a version",
    send: () => call("POST", versionsOf(ds.datasetId), { headers: json, body: '{"uploadId": "' }),
    status: 400,
    message: /The request body is not valid JSON/,
  },
  {
    name: "a JSON array where an object belongs",
    send: () => call("POST", versionsOf(ds.datasetId), { headers: json, body: "[1,2,3]" }),
    status: 400,
    message: /./,
  },
  {
    name: "JSON nested 5000 levels deep",
    send: () => call("POST", versionsOf(ds.datasetId), { headers: json, body: `${"[".repeat(5000)}${"]".repeat(5000)}` }),
    status: 400,
    message: /./,
  },
  {
    name: "a prototype-polluting body",
    send: () => call("POST", versionsOf(ds.datasetId), { headers: json, body: '{"__proto__": {"isAdmin": true}, "constructor": {"prototype": {"isAdmin": true}}}' }),
    status: 400,
    message: /uploadId/,
    then: async () => expect(({} as { isAdmin?: boolean }).isAdmin).toBeUndefined(),
  },
  {
    name: "building my dataset from another project's upload",
    send: () => call("POST", versionsOf(ds.datasetId), { headers: json, body: JSON.stringify({ uploadId: otherUpload, columnMap: demoMooringColumnMap(), mode: "replace" }) }),
    status: 404,
    message: /Upload/,
  },
  {
    name: "building another project's dataset from my upload",
    send: () => call("POST", versionsOf(otherDs.datasetId), { headers: json, body: JSON.stringify({ uploadId: ownUpload, columnMap: demoMooringColumnMap(), mode: "replace" }) }),
    status: 403,
    message: /./,
  },
  {
    name: "a column map with SQL for a variable name",
    send: () =>
      call("POST", versionsOf(ds.datasetId), {
        headers: json,
        body: JSON.stringify({
          uploadId: ownUpload,
          mode: "replace",
          columnMap: { ...demoMooringColumnMap(), columns: demoMooringColumnMap().columns.map((c, i) => (i === 0 ? { ...c, variable: "wind_speed'); drop table records; --" } : c)) },
        }),
      }),
    status: 400,
    message: /columnMap\.columns\.0\.variable/,
  },
  {
    name: "a manual flag whose end is before its start",
    send: () =>
      call("POST", `/api/datasets/${ds.datasetId}/annotations`, {
        headers: json,
        body: JSON.stringify({ from: "2026-10-02T00:00:00Z", to: "2026-10-01T00:00:00Z", variables: ["wind_speed"], flag: 4, reason: "icing" }),
      }),
    status: 400,
    message: /to must not be before from/,
  },
  {
    name: "a manual flag on a variable name with SQL in it",
    send: () =>
      call("POST", `/api/datasets/${ds.datasetId}/annotations`, {
        headers: json,
        body: JSON.stringify({ from: "2026-10-01T00:00:00Z", to: "2026-10-02T00:00:00Z", variables: ['wind_speed" = 1; drop table records; --'], flag: 4, reason: "icing" }),
      }),
    status: 400,
    message: /Variable names are lower-case keys such as wind_speed/,
  },
  // SQL-looking filter values
  {
    name: "catalogue sort with SQL",
    send: () => call("GET", `/api/v1/catalogue?sort=${encodeURIComponent("title; drop table datasets")}`, { cookie: null }),
    status: 400,
    message: /sort must be released, title, start or end/,
  },
  {
    name: "catalogue area with SQL",
    send: () => call("GET", `/api/v1/catalogue?bbox=${encodeURIComponent("1,2,3,4); delete from releases; --")}`, { cookie: null }),
    status: 400,
    message: /bbox is west,south,east,north in degrees/,
  },
  {
    name: "records platform filter with SQL is only text",
    send: () => call("GET", `/api/versions/${fx.versionId}/records?platform=${encodeURIComponent("' or '1'='1")}`, { cookie: null }),
    status: 200,
    message: /"items":\[\]/,
  },
  {
    name: "records variables with SQL",
    send: () => call("GET", `/api/versions/${fx.versionId}/records?variables=${encodeURIComponent("wind_speed,(select password from account)")}`, { cookie: null }),
    status: 400,
    message: /variables/,
  },
  {
    name: "records cursor that is not ours",
    send: () => call("GET", `/api/versions/${fx.versionId}/records?cursor=${encodeURIComponent("'; select pg_sleep(5); --")}`, { cookie: null }),
    status: 400,
    message: /cursor/,
  },
  {
    name: "plot buckets far too many",
    send: () => call("GET", `/api/versions/${fx.versionId}/plot?variables=wind_speed&buckets=1000000000`, { cookie: null }),
    status: 400,
    message: /buckets must be at most 5000/,
  },
  {
    name: "download variables with SQL",
    send: () => call("GET", `/api/v1/versions/${fx.versionId}/download?variables=${encodeURIComponent('wind_speed"; select pg_sleep(10); --')}`, { cookie: null }),
    status: 400,
    message: /variables/,
  },
  {
    name: "download time that is not a date",
    send: () => call("GET", `/api/v1/versions/${fx.versionId}/download?from=${encodeURIComponent("2026-13-45T99:00:00Z")}`, { cookie: null }),
    status: 400,
    message: /from/,
  },
  {
    name: "a release file name that climbs out of storage",
    send: () => call("GET", `/api/v1/releases/${fx.releaseId}/files/${encodeURIComponent("../../../../etc/passwd")}`, { cookie: null }),
    status: 404,
    message: /./,
  },
  {
    name: "an id that is not a UUID",
    send: () => call("GET", `/api/versions/${encodeURIComponent("1 or 1=1")}`, { cookie: null }),
    status: 400,
    message: /id/,
  },
];

async function counts() {
  const { rows } = await pool.query(`select
      (select count(*)::int from uploads) as uploads,
      (select count(*)::int from upload_inspections) as inspections,
      (select count(*)::int from versions) as versions,
      (select count(*)::int from qc_runs) as runs,
      (select count(*)::int from records) as records,
      (select count(*)::int from annotations) as annotations,
      (select count(*)::int from releases) as releases,
      (select count(*)::int from datasets) as datasets,
      (select count(*)::int from audit_log) as audit`);
  return rows[0] as Record<string, number>;
}

/** Other test files share the storage folder, so files are checked by this upload's id, not by counting. */
function storedFiles(id: string) {
  const part = readdirSync(storageDir("tus")).filter((f) => f.startsWith(id));
  return { part, upload: existsSync(pathForKey(uploadKey(id))) };
}

describe("hostile files and requests", () => {
  for (const row of table) {
    test(`${row.name}: ${row.status}`, async () => {
      const before = await counts();
      const r = await row.send();
      expect(r.status, r.text.slice(0, 300)).toBe(row.status);
      expect(r.text).toMatch(row.message);
      // Never a stack trace or a server path in what a person reads.
      expect(r.text).not.toMatch(/\n\s+at |node_modules|\/work\/|TypeError|ReferenceError/);
      if (r.status >= 400 && r.text.startsWith("{")) expect(JSON.parse(r.text).error.message).toEqual(expect.any(String));
      await row.then?.(r);
      const after = await counts();
      if ((row.stores ?? "nothing") === "nothing") {
        expect(after).toEqual(before);
        if (r.id) expect(storedFiles(r.id)).toEqual({ part: [], upload: false });
      } else {
        // One whole upload: its row, its inspection, its audit row and its stored file, and no tus part left behind.
        expect(after).toEqual({ ...before, uploads: before.uploads! + 1, inspections: before.inspections! + 1, audit: before.audit! + 1 });
        expect(storedFiles(r.id!)).toEqual({ part: [], upload: true });
        const { rows } = await pool.query(`select sha256, size_bytes from uploads where id = $1`, [r.id]);
        expect(rows[0].sha256).toMatch(/^[0-9a-f]{64}$/);
      }
      // The server is still up.
      expect((await fetch(`${app.base}/api/health`)).status).toBe(200);
    });
  }
});
