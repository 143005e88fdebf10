import Papa from "papaparse";
import { parquetReadObjects, parquetMetadata } from "hyparquet";
import request from "supertest";
import yauzl from "yauzl";
import { beforeAll, describe, expect, test } from "vitest";
import { pool } from "../../server/db/client";
import { as } from "../helpers/api";
import { makeVersion } from "../helpers/curation";
import { fixtureRows, fixtureSummary, fixtureVariables, insertRecords, releasedFixture } from "../helpers/released";
import { columnSql } from "../../server/db/record-flags";

type Fixture = Awaited<ReturnType<typeof releasedFixture>>;
let f: Fixture;
let multi: Fixture;

/** CSV text → rows of strings keyed by header (papaparse, no type guessing: the test compares exact text). */
function parse(text: string, _opts?: object): Record<string, string>[] {
  const out = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true });
  if (out.errors.length) throw new Error(JSON.stringify(out.errors.slice(0, 3)));
  return out.data;
}

/** A Buffer's bytes as their own ArrayBuffer (what hyparquet reads). */
const arrayBuffer = (b: Buffer): ArrayBuffer => new Uint8Array(b).buffer as ArrayBuffer;

/** Binary body as a Buffer (supertest parses only text by default). */
const binary = (t: request.Test) =>
  t.buffer(true).parse((res, cb) => {
    const chunks: Buffer[] = [];
    res.on("data", (c: Buffer) => chunks.push(c));
    res.on("end", () => cb(null, Buffer.concat(chunks)));
  });

/** The stored rows of version `n`, as PostgreSQL holds them (node-postgres parses float8 to the same double). */
async function stored(datasetId: string, n: number, extra = "") {
  const cols = fixtureVariables.flatMap((v) => [v, `${v}_qc`].map((c) => columnSql(c))).join(", ");
  const { rows } = await pool.query(
    `select platform, time, ${cols} from records where dataset_id = $1 and valid_from <= $2 and (valid_to is null or valid_to > $2) ${extra} order by platform, time`,
    [datasetId, n],
  );
  return rows as Record<string, unknown>[];
}

const num = (s: string) => (s === "" ? null : Number(s));
const same = (a: number | null, b: unknown) => (a === null ? b === null : Object.is(a, b as number));

beforeAll(async () => {
  f = await releasedFixture({ rows: 300 });
  multi = await releasedFixture({ rows: 20, platforms: ["=HYPERLINK(\"http://x.example\")", "+drifter", "-1+1", "@SUM(A1)", "\tbuoy", "\rbuoy", "merrow-07"] });
});

describe("CSV", () => {
  test("round trip: every value and flag parses back to what PostgreSQL stores; times are ISO 8601 UTC with Z", async () => {
    const res = await as(null).get(`/api/v1/versions/${f.versionId}/download?format=csv`);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^text\/csv/);
    expect(res.headers["content-disposition"]).toMatch(/^attachment; filename="series-[a-f0-9]{6}-v1\.csv"$/);
    const rows: Record<string, string>[] = parse(res.text, { columns: true });
    const header = Object.keys(rows[0]!);
    expect(header).toEqual(["time", ...fixtureVariables.flatMap((v) => [v, `${v}_qc`])]);
    const db = await stored(f.datasetId, 1);
    expect(rows).toHaveLength(db.length);
    expect(rows.length).toBe(300);
    rows.forEach((r, i) => {
      const s = db[i]!;
      // ISO 8601 (RFC 3339 profile) in UTC: "Z", fractional seconds only when present.
      expect(r.time).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d{1,6})?Z$/);
      expect(Date.parse(r.time!)).toBe((s.time as Date).getTime());
      for (const v of fixtureVariables) {
        expect(same(num(r[v]!), s[v]), `${v} row ${i}: ${r[v]} vs ${s[v]}`).toBe(true);
        expect(num(r[`${v}_qc`]!)).toBe(s[`${v}_qc`]);
      }
    });
    // The fixture's awkward values really are in there (NaN, missing, sub-normal, huge).
    expect(rows.some((r) => r.wind_speed === "NaN")).toBe(true);
    expect(rows.some((r) => r.wind_speed === "")).toBe(true);
    expect(rows.some((r) => r.magnitude_of_surface_downward_stress === "-1.5e-310")).toBe(true);
    expect(rows.some((r) => r.time!.endsWith(":00.25Z"))).toBe(true);
  });

  test("spreadsheet formulas in platform ids are neutralised (OWASP CSV injection advice) and round-trip with the apostrophe", async () => {
    const res = await as(null).get(`/api/v1/versions/${multi.versionId}/download`);
    expect(res.status).toBe(200);
    const rows: Record<string, string>[] = parse(res.text, { columns: true, relax_column_count: false });
    expect(Object.keys(rows[0]!).slice(0, 2)).toEqual(["time", "platform"]);
    const platforms = [...new Set(rows.map((r) => r.platform!))].sort();
    expect(platforms).toEqual(["'\tbuoy", "'\rbuoy", "'+drifter", "'-1+1", "'=HYPERLINK(\"http://x.example\")", "'@SUM(A1)", "merrow-07"].sort());
    for (const p of platforms) expect(p).not.toMatch(/^[=+\-@\t\r]/);
    expect(rows).toHaveLength(7 * 20);
  });

  test("subsets are exact: time range [from, to), chosen variables, QC level and decimation", async () => {
    const from = "2026-03-01T05:00:00Z";
    const to = "2026-03-02T00:00:00Z";
    const res = await as(null).get(`/api/v1/versions/${f.versionId}/download?from=${from}&to=${to}&variables=wind_speed&qc=pass&every=3`);
    expect(res.status).toBe(200);
    expect(res.headers["content-disposition"]).toContain("-v1-subset.csv");
    const rows: Record<string, string>[] = parse(res.text, { columns: true });
    expect(Object.keys(rows[0]!)).toEqual(["time", "wind_speed", "wind_speed_qc"]);
    // Expected, computed here from the stored rows: every 3rd record in the range, then only passing wind speeds.
    const inRange = (await stored(f.datasetId, 1)).filter((s) => (s.time as Date).getTime() >= Date.parse(from) && (s.time as Date).getTime() < Date.parse(to));
    const expected = inRange.filter((_, i) => i % 3 === 0).filter((s) => s.wind_speed_qc === 1);
    expect(rows.map((r) => Date.parse(r.time!))).toEqual(expected.map((s) => (s.time as Date).getTime()));
    rows.forEach((r, i) => expect(same(num(r.wind_speed!), expected[i]!.wind_speed)).toBe(true));
    expect(rows.every((r) => r.wind_speed_qc === "1")).toBe(true);
    expect(rows.length).toBeGreaterThan(5);
  });

  test("qc=pass_suspect keeps flags 1, 2 and 3; values below the level are blank with their flag kept", async () => {
    const res = await as(null).get(`/api/v1/versions/${f.versionId}/download?qc=pass_suspect&variables=wind_speed,air_temperature`);
    const rows: Record<string, string>[] = parse(res.text, { columns: true });
    const db = (await stored(f.datasetId, 1)).filter((s) => [1, 2, 3].includes(s.wind_speed_qc as number) || [1, 2, 3].includes(s.air_temperature_qc as number));
    expect(rows).toHaveLength(db.length);
    rows.forEach((r, i) => {
      for (const v of ["wind_speed", "air_temperature"] as const) {
        const flag = db[i]![`${v}_qc`] as number;
        expect(Number(r[`${v}_qc`])).toBe(flag);
        if ([1, 2, 3].includes(flag)) expect(same(num(r[v]!), db[i]![v])).toBe(true);
        else expect(r[v]).toBe("");
      }
    });
  });

  test("bad parameters name the field", async () => {
    const bad = await as(null).get(`/api/v1/versions/${f.versionId}/download?format=xlsx&every=0&from=yesterday`);
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.details).sort()).toEqual(["every", "format", "from"]);
    const unknown = await as(null).get(`/api/v1/versions/${f.versionId}/download?variables=wind_speed,sea_ice_thickness`);
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.details.variables[0]).toContain("sea_ice_thickness");
    const reversed = await as(null).get(`/api/v1/versions/${f.versionId}/download?from=2026-03-02T00:00:00Z&to=2026-03-01T00:00:00Z`);
    expect(reversed.status).toBe(400);
    expect(reversed.body.error.details.to).toBeDefined();
    expect((await as(null).get(`/api/v1/versions/00000000-0000-4000-8000-000000000000/download`)).status).toBe(404);
  });
});

describe("drafts", () => {
  test("only project members may download a version that is not released: visitor 401, outsider 403", async () => {
    const draft = await makeVersion({ datasetId: f.datasetId, state: "ready", createdBy: f.users.contributor.id, summary: fixtureSummary(fixtureRows(5)) });
    await insertRecords(f.datasetId, 2, fixtureRows(5, [""], Date.parse("2026-04-01T00:00:00Z")));
    expect((await as(null).get(`/api/v1/versions/${draft}/download`)).status).toBe(401);
    const outsider = await as(f.users.outsider.cookie).get(`/api/v1/versions/${draft}/download`);
    expect(outsider.status).toBe(403);
    expect(outsider.text).not.toContain("wind_speed,");
    const member = await as(f.users.contributor.cookie).get(`/api/v1/versions/${draft}/download`);
    expect(member.status).toBe(200);
    // Version 2 sees version 1's 300 rows plus its own 5.
    expect(parse(member.text, { columns: true })).toHaveLength(305);
    expect(member.headers["cache-control"]).toContain("no-store");
    const processing = await makeVersion({ datasetId: f.datasetId, state: "processing", createdBy: f.users.contributor.id });
    expect((await as(f.users.contributor.cookie).get(`/api/v1/versions/${processing}/download`)).status).toBe(409);
  });
});

describe("Parquet", () => {
  test("round trip with hyparquet: values, flags and times equal the stored rows; units travel in the metadata", async () => {
    const res = await binary(as(null).get(`/api/v1/versions/${f.versionId}/download?format=parquet`));
    expect(res.status).toBe(200);
    expect(res.headers["content-disposition"]).toMatch(/-v1\.parquet"$/);
    const body = res.body as Buffer;
    // Parquet files start and end with the magic "PAR1" (Apache Parquet file format).
    expect(body.subarray(0, 4).toString()).toBe("PAR1");
    expect(body.subarray(-4).toString()).toBe("PAR1");
    const file = arrayBuffer(body);
    const meta = parquetMetadata(file);
    const vars = JSON.parse(meta.key_value_metadata!.find((k) => k.key === "tauline.variables")!.value!);
    expect(vars.find((v: { name: string }) => v.name === "air_temperature")).toMatchObject({ units: "K", standardName: "air_temperature" });
    const rows = (await parquetReadObjects({ file })) as Record<string, unknown>[];
    const db = await stored(f.datasetId, 1);
    expect(rows).toHaveLength(db.length);
    rows.forEach((r, i) => {
      expect((r.time as Date).getTime()).toBe((db[i]!.time as Date).getTime());
      for (const v of fixtureVariables) {
        expect(same(r[v] as number | null, db[i]![v]), `${v} row ${i}`).toBe(true);
        expect(r[`${v}_qc`]).toBe(db[i]![`${v}_qc`]);
      }
    });
  });

  test("a subset writes exactly the chosen rows and columns", async () => {
    const res = await binary(as(null).get(`/api/v1/versions/${multi.versionId}/download?format=parquet&variables=air_temperature&every=4`));
    const body = res.body as Buffer;
    const rows = (await parquetReadObjects({ file: arrayBuffer(body) })) as Record<string, unknown>[];
    expect(Object.keys(rows[0]!)).toEqual(["time", "platform", "air_temperature", "air_temperature_qc"]);
    expect(rows).toHaveLength(7 * 5);
    // Parquet keeps the raw platform id: only the CSV (spreadsheet-bound) neutralises it.
    expect(rows.some((r) => r.platform === "=HYPERLINK(\"http://x.example\")")).toBe(true);
  });
});

/** Entries of a zip in memory. */
async function unzip(buf: Buffer): Promise<Map<string, Buffer>> {
  const zip = await new Promise<yauzl.ZipFile>((res, rej) => yauzl.fromBuffer(buf, { lazyEntries: true }, (e, z) => (e ? rej(e) : res(z!))));
  const out = new Map<string, Buffer>();
  await new Promise<void>((resolve, reject) => {
    zip.on("entry", (entry: yauzl.Entry) => {
      zip.openReadStream(entry, (e, s) => {
        if (e) return reject(e);
        const chunks: Buffer[] = [];
        s!.on("data", (c: Buffer) => chunks.push(c));
        s!.on("end", () => {
          out.set(entry.fileName, Buffer.concat(chunks));
          zip.readEntry();
        });
      });
    });
    zip.on("end", resolve);
    zip.on("error", reject);
    zip.readEntry();
  });
  return out;
}

describe("Frictionless Data Package", () => {
  test("the zip holds datapackage.json, the CSV and a README; the descriptor has what Data Package v2.0 requires", async () => {
    const res = await binary(as(null).get(`/api/v1/versions/${f.versionId}/download?format=datapackage`));
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toBe("application/zip");
    const files = await unzip(res.body as Buffer);
    const dp = JSON.parse(files.get("datapackage.json")!.toString());
    // Data Package v2.0 (datapackage.org/standard/data-package, 2024): `resources` is required and non-empty;
    // `name` is lower-case with . - _ only; a `licenses` item needs `name` or `path`; a `sources` item needs `title`.
    expect(dp.$schema).toBe("https://datapackage.org/profiles/2.0/datapackage.json");
    expect(Array.isArray(dp.resources) && dp.resources.length >= 1).toBe(true);
    expect(dp.name).toMatch(/^[a-z0-9._-]+$/);
    for (const l of dp.licenses) expect(l.name ?? l.path).toBeTruthy();
    expect(dp.licenses[0].name).toBe("CC-BY-4.0");
    for (const s of dp.sources) expect(typeof s.title).toBe("string");
    expect(dp.citation).toContain("Ada Merrow and Bram Tideway");
    // Data Resource v2.0: `name` required (unique, same pattern) and exactly one of `path` / `data`.
    const r = dp.resources[0];
    expect(r.name).toMatch(/^[a-z0-9._-]+$/);
    expect(r.path && !r.data).toBeTruthy();
    expect(files.has(r.path)).toBe(true);
    // Table Schema v2.0: `fields` required; each field has a `name`; types from the listed set.
    const fields = r.schema.fields as Record<string, unknown>[];
    const types = new Set(["string", "number", "integer", "boolean", "object", "array", "list", "datetime", "date", "time", "year", "yearmonth", "duration", "geopoint", "geojson", "any"]);
    for (const fl of fields) {
      expect(typeof fl.name).toBe("string");
      expect(types.has(fl.type as string)).toBe(true);
    }
    const csv: Record<string, string>[] = parse(files.get(r.path)!.toString(), { columns: true });
    expect(fields.map((fl) => fl.name)).toEqual(Object.keys(csv[0]!));
    expect(csv).toHaveLength(300);
    // Units and CF standard names (CF standard-name table), flag values and meanings on each _qc field.
    expect(fields.find((fl) => fl.name === "air_temperature")).toMatchObject({ units: "K", standard_name: "air_temperature", type: "number" });
    expect(fields.find((fl) => fl.name === "magnitude_of_surface_downward_stress")).toMatchObject({ units: "Pa" });
    expect(fields.find((fl) => fl.name === "wind_speed_qc")).toMatchObject({
      type: "integer",
      flag_values: [1, 2, 3, 4, 9],
      flag_meanings: "pass not_evaluated suspect fail missing",
    });
    const readme = files.get("README.md")!.toString();
    expect(readme).toContain("not for navigation or safety");
    expect(readme).toContain("wind_speed [m s-1]");
  });
});
