/**
 * Downloads of a version's records: CSV, a Frictionless Data Package (zip) and Parquet, whole or as a subset.
 * Everything streams from PostgreSQL to the writer: CSV straight out of `COPY … TO STDOUT` (PostgreSQL writes
 * the CSV, so the download runs near raw COPY speed), Parquet from a cursor, one row group per batch. No file is
 * ever held whole in memory.
 */
import { createHash } from "node:crypto";
import { createReadStream } from "node:fs";
import { stat } from "node:fs/promises";
import { PassThrough, Readable, Transform, Writable } from "node:stream";
import { pipeline } from "node:stream/promises";
import type { PoolClient } from "pg";
import Cursor from "pg-cursor";
import { to as copyTo } from "pg-copy-streams";
import { ParquetWriter, ByteWriter } from "hyparquet-writer";
import yazl from "yazl";
import { eq } from "drizzle-orm";
import { qcFlagMeanings, qcLevelFlags, type DownloadFormat, type DownloadQuery, type ReleaseFileCheck, type ReleaseVerification } from "@shared/schemas/downloads";
import { builtVersionStates } from "@shared/schemas/versions";
import { derivedVocabulary, derivedVariables, measuredVariables, vocabulary, type MeasuredVariable } from "@shared/vocabulary";
import { db, pool } from "../db/client";
import { columnSql, flagSql } from "../db/record-flags";
import { datasets, projects, releases, versions } from "../db/schema";
import { env } from "../env";
import { AppError, notFound, unauthenticated } from "../lib/errors";
import type { SessionUser } from "../middleware/require-session";
import { pathForKey, releaseFileKey } from "../lib/file-store";
import { canReadVersionData, getRelease } from "./releases";

/** What one variable column means: its CF standard name (when CF has one), long name and canonical unit. */
export interface VariableMeta {
  name: string;
  standardName: string | null;
  longName: string;
  units: string;
}

const known = new Set<string>([...measuredVariables, ...derivedVariables]);

/** Metadata of a canonical variable key (shared/vocabulary.ts). */
export function variableMeta(name: string): VariableMeta {
  if ((measuredVariables as readonly string[]).includes(name)) {
    const v = vocabulary[name as MeasuredVariable];
    return { name, standardName: name, longName: v.label, units: v.canonicalUnit };
  }
  const d = (derivedVocabulary as Record<string, { standardName?: string; longName: string; unit: string }>)[name];
  if (!d) throw new Error(`unknown variable ${name}`);
  return { name, standardName: d.standardName ?? null, longName: d.longName, units: d.unit };
}

/** Everything a download needs, resolved and checked once. */
export interface DownloadPlan {
  versionId: string;
  versionNumber: number;
  versionState: string;
  datasetId: string;
  datasetTitle: string;
  datasetDescription: string | null;
  projectName: string;
  licence: string;
  release: { id: string; releaseNumber: number; citation: string; stableUrl: string; releasedAt: string; authors: string[] } | null;
  variables: VariableMeta[];
  /** The version holds more than one platform, so rows carry a platform column. */
  platformColumn: boolean;
  from?: string;
  to?: string;
  qc: DownloadQuery["qc"];
  every: number;
  /** True when anything narrows the whole version. */
  subset: boolean;
}

/** Lower-case words joined by "-", for file names built by the server (never the client's). */
export function slug(text: string): string {
  return (
    text
      .normalize("NFKD")
      .replace(/[\u0300-\u036f]/g, "")
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, "-")
      .replace(/^-+|-+$/g, "")
      .slice(0, 80) || "dataset"
  );
}

export const formatExtension: Record<DownloadFormat, string> = { csv: "csv", datapackage: "zip", parquet: "parquet" };
export const formatMediaType: Record<DownloadFormat, string> = {
  csv: "text/csv; charset=utf-8",
  datapackage: "application/zip",
  parquet: "application/vnd.apache.parquet",
};

/** The download's file name: dataset, version, "subset" when narrowed. */
export function downloadFileName(plan: DownloadPlan, format: DownloadFormat): string {
  return `${slug(plan.datasetTitle)}-v${plan.versionNumber}${plan.subset ? "-subset" : ""}.${formatExtension[format]}`;
}

/** Content-Disposition with an ASCII name (the server builds it from a slug, so no quoting issues). */
export function contentDisposition(fileName: string): string {
  return `attachment; filename="${fileName.replace(/[^A-Za-z0-9._-]/g, "_")}"`;
}

/**
 * Checks who may download a version and what they asked for. Released and superseded versions are for
 * everyone; others only for project members (visitor 401, signed-in outsider 403).
 */
export async function planDownload(user: SessionUser | null | undefined, versionId: string, query: DownloadQuery): Promise<DownloadPlan> {
  const [found] = await db.select({ id: versions.id }).from(versions).where(eq(versions.id, versionId));
  if (!found) throw notFound("Version");
  if (!(await canReadVersionData(user, versionId))) {
    if (!user) throw unauthenticated();
    throw new AppError("forbidden", "This version is not released; only members of its project can download it", 403);
  }
  return planVersion(versionId, query);
}

/** The plan of a version's download, without access checks (callers check; the release-file job is trusted). */
export async function planVersion(versionId: string, query: DownloadQuery): Promise<DownloadPlan> {
  const [row] = await db
    .select({ v: versions, title: datasets.title, description: datasets.description, licence: datasets.licence, projectName: projects.name })
    .from(versions)
    .innerJoin(datasets, eq(datasets.id, versions.datasetId))
    .innerJoin(projects, eq(projects.id, datasets.projectId))
    .where(eq(versions.id, versionId));
  if (!row) throw notFound("Version");
  const state = row.v.state;
  if (!(builtVersionStates as readonly string[]).includes(state) && state !== "retracted") {
    throw new AppError("conflict", `Version ${row.v.number} has no data to download yet (it is ${state.replace("_", " ")})`, 409);
  }
  const available = versionVariables(row.v.summary);
  let chosen = available;
  if (query.variables) {
    const unknown = query.variables.filter((v) => !available.includes(v));
    if (unknown.length) {
      throw new AppError("validation_failed", `This version has no variable ${unknown.join(", ")}`, 400, {
        variables: [`Unknown here: ${unknown.join(", ")}. This version has: ${available.join(", ") || "none"}`],
      });
    }
    chosen = available.filter((v) => query.variables!.includes(v));
  }
  const [rel] = await db.select().from(releases).where(eq(releases.versionId, versionId));
  const { rows } = await pool.query<{ multi: boolean }>(
    `select exists(select 1 from records where dataset_id = $1 and platform <> '' and valid_from <= $2 and (valid_to is null or valid_to > $2)) as multi`,
    [row.v.datasetId, row.v.number],
  );
  return {
    versionId,
    versionNumber: row.v.number,
    versionState: state,
    datasetId: row.v.datasetId,
    datasetTitle: row.title,
    datasetDescription: row.description,
    projectName: row.projectName,
    licence: rel?.licence ?? row.licence,
    release: rel
      ? { id: rel.id, releaseNumber: rel.releaseNumber, citation: rel.citation, stableUrl: rel.stableUrl, releasedAt: rel.releasedAt.toISOString(), authors: rel.authors }
      : null,
    variables: chosen.map(variableMeta),
    platformColumn: !!rows[0]?.multi,
    from: query.from,
    to: query.to,
    qc: query.qc,
    every: query.every,
    subset: !!(query.from || query.to || query.variables || query.qc !== "all" || query.every > 1),
  };
}

/** The canonical variables a built version holds, in vocabulary order (from its summary). */
export function versionVariables(summary: unknown): string[] {
  const names = new Set(((summary as { variables?: { variable: string }[] } | null)?.variables ?? []).map((v) => v.variable));
  return [...measuredVariables, ...derivedVariables].filter((v) => names.has(v) && known.has(v));
}

const ident = (name: string) => {
  if (!known.has(name)) throw new Error(`not a variable column: ${name}`);
  return `"${name}"`;
};
const lit = (s: string) => `'${s.replace(/'/g, "''")}'`;

/**
 * ISO 8601 UTC with Z; fractional seconds only when the time has them (exact round trip either way). Built from
 * PostgreSQL's own timestamptz text with the session zone set to UTC ("2026-03-01 00:00:00.25+00"), which costs
 * less than half of to_char() on millions of rows.
 */
const TIME_SQL = `replace(replace(time::text, ' ', 'T'), '+00', 'Z')`;

/**
 * A platform id comes from the uploaded file, so a spreadsheet could run it as a formula: text cells starting
 * with = + - @, tab or CR get a leading apostrophe (OWASP "CSV injection" advice). Number cells are written by
 * PostgreSQL's float output (digits, sign, exponent, NaN, Infinity) and cannot hold a formula.
 */
const PLATFORM_CSV_SQL = `case when platform ~ '^[-=+@\\t\\r]' then '''' || platform else platform end`;

/**
 * The SELECT of a download. Identifiers come from the vocabulary whitelist and literals are validated (uuid,
 * integer, ISO instant) and quoted, because COPY takes no bind parameters.
 */
export function downloadSql(plan: DownloadPlan, style: "csv" | "rows"): string {
  const n = Math.trunc(plan.versionNumber);
  const where = [`dataset_id = ${lit(plan.datasetId)}::uuid`, `valid_from <= ${n}`, `(valid_to is null or valid_to > ${n})`];
  if (plan.from) where.push(`time >= ${lit(new Date(plan.from).toISOString())}::timestamptz`);
  if (plan.to) where.push(`time < ${lit(new Date(plan.to).toISOString())}::timestamptz`);
  const cols: string[] = [];
  cols.push(style === "csv" ? `${TIME_SQL} as time` : `extract(epoch from time)::float8 * 1000 as time`);
  if (plan.platformColumn) cols.push(style === "csv" ? `${PLATFORM_CSV_SQL} as platform` : "platform");
  const accepted = plan.qc === "all" ? null : qcLevelFlags[plan.qc].join(", ");
  for (const v of plan.variables) {
    const c = ident(v.name);
    const f = flagSql(v.name);
    cols.push(accepted ? `case when ${f} in (${accepted}) then ${c} end as ${c}` : c, columnSql(`${v.name}_qc`));
  }
  // Decimation counts records of the time range; the QC level then drops rows with no accepted value left.
  const qcWhere = accepted && plan.variables.length ? [`(${plan.variables.map((v) => `${flagSql(v.name)} in (${accepted})`).join(" or ")})`] : [];
  const order = "order by platform, time";
  if (plan.every > 1) {
    const inner = `select *, row_number() over (partition by platform order by time) as rn_ from records where ${where.join(" and ")}`;
    return `select ${cols.join(", ")} from (${inner}) r where ${[`(rn_ - 1) % ${Math.trunc(plan.every)} = 0`, ...qcWhere].join(" and ")} ${order}`;
  }
  return `select ${cols.join(", ")} from records where ${[...where, ...qcWhere].join(" and ")} ${order}`;
}

/** Runs `fn` on a pooled client; a failed stream drops the connection (a half-read COPY cannot be reused). */
async function withClient<T>(fn: (c: PoolClient) => Promise<T>): Promise<T> {
  const c = await pool.connect();
  try {
    const r = await fn(c);
    c.release();
    return r;
  } catch (e) {
    c.release(e instanceof Error ? e : new Error(String(e)));
    throw e;
  }
}

/** The CSV of a plan, streamed from PostgreSQL's COPY into `out` (which is ended). */
export async function writeCsv(plan: DownloadPlan, out: Writable): Promise<void> {
  await withClient(async (c) => {
    // The time text above needs the session zone UTC; set locally so the pooled connection keeps its settings.
    await c.query("begin read only");
    await c.query("set local timezone = 'UTC'");
    await c.query("set local statement_timeout = 0");
    const copy = c.query(copyTo(`COPY (${downloadSql(plan, "csv")}) TO STDOUT WITH (FORMAT csv, HEADER true)`));
    await pipeline(copy, out);
    await c.query("commit");
  });
}

/** The CSV of a plan as a readable stream (for the data package's zip entry). */
function csvStream(plan: DownloadPlan): { stream: PassThrough; done: Promise<void> } {
  const stream = new PassThrough();
  const done = writeCsv(plan, stream);
  done.catch((e) => stream.destroy(e));
  return { stream, done };
}

/** Rows per Parquet row group (and per cursor read). */
const PARQUET_BATCH = 65_536;

/**
 * Parquet, written one row group per cursor batch: time as a UTC timestamp (milliseconds), platform as text,
 * variables as nullable doubles, flags as nullable 32-bit integers; units and standard names in the file's
 * key-value metadata ("tauline.variables").
 */
export async function writeParquet(plan: DownloadPlan, out: Writable): Promise<void> {
  const schema: { name: string; [k: string]: unknown }[] = [
    { name: "root", num_children: 1 + (plan.platformColumn ? 1 : 0) + plan.variables.length * 2 },
    { name: "time", type: "INT64", repetition_type: "REQUIRED", converted_type: "TIMESTAMP_MILLIS", logical_type: { type: "TIMESTAMP", isAdjustedToUTC: true, unit: "MILLIS" } },
  ];
  if (plan.platformColumn) schema.push({ name: "platform", type: "BYTE_ARRAY", converted_type: "UTF8", repetition_type: "REQUIRED" });
  for (const v of plan.variables) {
    schema.push({ name: v.name, type: "DOUBLE", repetition_type: "OPTIONAL" });
    schema.push({ name: `${v.name}_qc`, type: "INT32", repetition_type: "OPTIONAL" });
  }
  // Bytes leave after every row group; the writer's buffer is reused, so memory stays at one row group.
  const writer = new ByteWriter(1 << 20) as ByteWriter & { index: number; flush?: () => Promise<void> };
  const push = async () => {
    if (!writer.index) return;
    const chunk = Buffer.from(new Uint8Array(writer.buffer, 0, writer.index));
    writer.index = 0;
    if (!out.write(chunk)) await new Promise<void>((resolve, reject) => {
      out.once("drain", resolve);
      out.once("error", reject);
    });
  };
  writer.flush = push;
  const pw = new ParquetWriter({
    writer,
    schema: schema as never,
    kvMetadata: [{ key: "tauline.variables", value: JSON.stringify(plan.variables) }, { key: "tauline.flags", value: JSON.stringify(qcFlagMeanings) }],
    createdBy: "Tauline",
  });
  await withClient(async (c) => {
    const cursor = c.query(new Cursor(downloadSql(plan, "rows")));
    try {
      for (;;) {
        const rows: Record<string, number | string | null>[] = await cursor.read(PARQUET_BATCH);
        if (!rows.length) break;
        const columnData: { name: string; data: unknown[] }[] = [{ name: "time", data: rows.map((r) => BigInt(Math.round(r.time as number))) }];
        if (plan.platformColumn) columnData.push({ name: "platform", data: rows.map((r) => r.platform as string) });
        for (const v of plan.variables) {
          columnData.push({ name: v.name, data: rows.map((r) => r[v.name] as number | null) });
          columnData.push({ name: `${v.name}_qc`, data: rows.map((r) => r[`${v.name}_qc`] as number | null) });
        }
        await pw.write({ columnData: columnData as never, rowGroupSize: rows.length });
        await push();
      }
    } finally {
      await cursor.close();
    }
  });
  await pw.finish();
  await push();
  await new Promise<void>((resolve, reject) => out.end((e?: Error | null) => (e ? reject(e) : resolve())));
}

/** The Frictionless Data Package descriptor (Data Package v2.0) of a plan. */
export function dataPackageDescriptor(plan: DownloadPlan, csvName: string) {
  const fields: Record<string, unknown>[] = [
    { name: "time", type: "datetime", format: "default", description: "Time of the record, ISO 8601 in UTC (Z)", standard_name: "time", constraints: { required: true } },
  ];
  if (plan.platformColumn) fields.push({ name: "platform", type: "string", description: "Platform id as given in the uploaded file" });
  for (const v of plan.variables) {
    fields.push({
      name: v.name,
      type: "number",
      title: v.longName,
      description: `${v.longName} in ${v.units}`,
      units: v.units,
      ...(v.standardName ? { standard_name: v.standardName } : {}),
      long_name: v.longName,
    });
    fields.push({
      name: `${v.name}_qc`,
      type: "integer",
      title: `QC flag of ${v.name}`,
      description: `Aggregate QC flag of ${v.name}: ${qcFlagMeanings.map((f) => `${f.value} ${f.meaning}`).join(", ")}`,
      categories: qcFlagMeanings.map((f) => ({ value: f.value, label: f.meaning })),
      flag_values: qcFlagMeanings.map((f) => f.value),
      flag_meanings: qcFlagMeanings.map((f) => f.meaning).join(" "),
      ...(v.standardName ? { standard_name: `${v.standardName} status_flag` } : {}),
    });
  }
  const base = env.PUBLIC_URL.replace(/\/$/, "");
  const datasetUrl = `${base}/datasets/${plan.datasetId}`;
  return {
    $schema: "https://datapackage.org/profiles/2.0/datapackage.json",
    name: `${slug(plan.datasetTitle)}-v${plan.versionNumber}`,
    id: plan.release?.stableUrl ?? datasetUrl,
    title: `${plan.datasetTitle}, version ${plan.versionNumber}`,
    description: plan.datasetDescription ?? `${plan.datasetTitle} (${plan.projectName}), version ${plan.versionNumber}.`,
    version: String(plan.versionNumber),
    homepage: datasetUrl,
    created: new Date().toISOString(),
    licenses: [licenceEntry(plan.licence)],
    citation: plan.release?.citation ?? null,
    contributors: (plan.release?.authors ?? []).map((a) => ({ title: a, roles: ["creator"] })),
    sources: [
      {
        title: `Tauline: ${plan.projectName}, ${plan.datasetTitle}, version ${plan.versionNumber}${plan.release ? ` (release ${plan.release.releaseNumber})` : " (not released)"}`,
        path: plan.release?.stableUrl ?? datasetUrl,
      },
    ],
    keywords: ["ocean", "air-sea interaction", "wind", "currents", "quality control"],
    subset: plan.subset ? { from: plan.from ?? null, to: plan.to ?? null, qc: plan.qc, every: plan.every, variables: plan.variables.map((v) => v.name) } : null,
    resources: [
      {
        $schema: "https://datapackage.org/profiles/2.0/dataresource.json",
        name: "records",
        type: "table",
        path: csvName,
        format: "csv",
        mediatype: "text/csv",
        encoding: "utf-8",
        dialect: { $schema: "https://datapackage.org/profiles/2.0/tabledialect.json", header: true, delimiter: ",", quoteChar: '"' },
        schema: {
          $schema: "https://datapackage.org/profiles/2.0/tableschema.json",
          fields,
          missingValues: [""],
          primaryKey: plan.platformColumn ? ["platform", "time"] : ["time"],
        },
      },
    ],
  };
}

const licenceTitles: Record<string, { title: string; path: string }> = {
  "CC-BY-4.0": { title: "Creative Commons Attribution 4.0", path: "https://creativecommons.org/licenses/by/4.0/" },
  "CC-BY-SA-4.0": { title: "Creative Commons Attribution-ShareAlike 4.0", path: "https://creativecommons.org/licenses/by-sa/4.0/" },
  "CC0-1.0": { title: "Creative Commons Zero 1.0", path: "https://creativecommons.org/publicdomain/zero/1.0/" },
  "ODC-BY-1.0": { title: "Open Data Commons Attribution 1.0", path: "https://opendatacommons.org/licenses/by/1-0/" },
};
function licenceEntry(id: string) {
  return { name: id, ...(licenceTitles[id] ?? { title: id }) };
}

/** The README of a data package: what is inside, units, flags, citation and the usual caution. */
export function dataPackageReadme(plan: DownloadPlan, csvName: string): string {
  const lines = [
    `${plan.datasetTitle}, version ${plan.versionNumber}`,
    "=".repeat(Math.min(80, plan.datasetTitle.length + 12)),
    "",
    `Project: ${plan.projectName}`,
    plan.release ? `Release ${plan.release.releaseNumber}, ${plan.release.releasedAt.slice(0, 10)}: ${plan.release.stableUrl}` : "This version is not released: it may still change or be withdrawn.",
    `Licence: ${plan.licence}`,
    "",
    "Files",
    "-----",
    `- datapackage.json: the Frictionless Data Package (v2.0) descriptor: columns, units, CF standard names, QC flags, licence, citation.`,
    `- ${csvName}: the records. Times are ISO 8601 in UTC (Z). One column per variable in its canonical unit, each followed by its <name>_qc flag.`,
    "",
    "Variables",
    "---------",
    ...plan.variables.map((v) => `- ${v.name} [${v.units}]: ${v.longName}${v.standardName ? ` (CF standard name ${v.standardName})` : " (no CF standard name)"}`),
    "",
    "QC flags",
    "--------",
    ...qcFlagMeanings.map((f) => `- ${f.value}: ${f.meaning.replace("_", " ")}`),
    plan.qc === "all" ? "" : `\nSubset: values below the QC level "${plan.qc.replace("_", " and ")}" are left empty; their flag shows why.`,
    "",
    "Cite as",
    "-------",
    plan.release?.citation ?? "Not released: cite only after a release.",
    "",
    "Caution",
    "-------",
    "Derived air-sea diagnostics (wind stress, Ekman transport and currents, upwelling index and the like) are",
    "scientific estimates from bulk formulas. They are not for navigation or safety decisions: follow official",
    "forecasts and warnings, local rules and qualified marine practice.",
    "",
    "Cells of the platform column that start with = + - @, tab or CR carry a leading apostrophe so spreadsheets",
    "do not run them as formulas.",
    "",
  ];
  return lines.join("\n");
}

/** A zip holding datapackage.json, README.md and the CSV (streamed into the archive entry). */
export async function writeDataPackage(plan: DownloadPlan, out: Writable): Promise<void> {
  const csvName = `data/${slug(plan.datasetTitle)}-v${plan.versionNumber}.csv`;
  const zip = new yazl.ZipFile();
  const mtime = new Date();
  zip.addBuffer(Buffer.from(JSON.stringify(dataPackageDescriptor(plan, csvName), null, 2) + "\n"), "datapackage.json", { mtime });
  zip.addBuffer(Buffer.from(dataPackageReadme(plan, csvName)), "README.md", { mtime });
  const csv = csvStream(plan);
  zip.addReadStream(csv.stream, csvName, { mtime });
  zip.end();
  await Promise.all([pipeline(zip.outputStream as Readable, out), csv.done]);
}

/** Writes a plan in a format. */
export function writeDownload(plan: DownloadPlan, format: DownloadFormat, out: Writable): Promise<void> {
  if (format === "csv") return writeCsv(plan, out);
  if (format === "parquet") return writeParquet(plan, out);
  return writeDataPackage(plan, out);
}

/** Counts bytes and feeds a hash as they pass (release files, checks on serving). */
export function tap(onChunk: (b: Buffer) => void): Transform {
  return new Transform({
    transform(chunk: Buffer, _enc, cb) {
      onChunk(chunk);
      cb(null, chunk);
    },
  });
}

/** Whether the caller may fetch a release's data (live releases: anyone; retracted: members only). */
async function releaseForData(user: SessionUser | null | undefined, releaseId: string) {
  const rel = await getRelease(user, releaseId);
  if (!rel.dataAvailable) {
    if (!user) throw unauthenticated();
    throw new AppError("forbidden", "This release was retracted; its data is for members of the project only", 403);
  }
  return rel;
}

const formatNumbers: Record<string, 1 | 2 | 3> = { csv: 1, datapackage: 2, parquet: 3 };
const keyOf = (releaseId: string, format: string) => {
  const n = formatNumbers[format];
  if (!n) throw new Error(`unknown release file format ${format}`);
  return releaseFileKey(releaseId, n);
};

/** SHA-256 of a stored file, streamed. */
async function sha256File(path: string): Promise<string> {
  const hash = createHash("sha256");
  await pipeline(createReadStream(path), tap((b) => hash.update(b)), new Writable({ write: (_c, _e, cb) => cb() }));
  return hash.digest("hex");
}

/** A whole-release file, ready to stream: the bytes are hashed as they go and the stream fails on a mismatch. */
export async function openReleaseFile(user: SessionUser | null | undefined, releaseId: string, name: string) {
  const rel = await releaseForData(user, releaseId);
  const file = rel.files.find((f) => f.name === name);
  if (!file) {
    throw notFound(rel.files.length ? "File" : "File (the release files are still being built; try again in a few minutes)");
  }
  const path = pathForKey(keyOf(releaseId, file.format));
  const size = await stat(path).then((s) => s.size, () => null);
  if (size === null) throw new AppError("unavailable", "The stored file of this release is missing; the repository team has to restore it", 503);
  if (size !== file.sizeBytes) {
    throw new AppError("conflict", `The stored file no longer matches its release record (${size} bytes instead of ${file.sizeBytes}); it is not served`, 409);
  }
  const hash = createHash("sha256");
  // The last chunk is held back until the whole file's hash is known: on a mismatch the response ends short of
  // its Content-Length, so the client sees a failed download rather than bad bytes.
  let held: Buffer | null = null;
  const checked = new Transform({
    transform(chunk: Buffer, _e, cb) {
      hash.update(chunk);
      const out = held;
      held = chunk;
      cb(null, out ?? undefined);
    },
    flush(cb) {
      const got = hash.digest("hex");
      if (got !== file.sha256) {
        const cause = new Error(`release file ${releaseId}/${name}: sha256 ${got} differs from recorded ${file.sha256}`);
        return cb(new AppError("conflict", "The stored file no longer matches the SHA-256 fixed at release; it is not served", 409, undefined, { cause }));
      }
      if (held) this.push(held);
      cb();
    },
  });
  return { file, stream: createReadStream(path).pipe(checked) };
}

// GET /api/v1/releases/:id/verify
/** Re-computes every release file's SHA-256 and compares it with the one fixed at release. */
export async function verifyRelease(user: SessionUser | null | undefined, releaseId: string): Promise<ReleaseVerification> {
  const rel = await releaseForData(user, releaseId);
  const items: ReleaseFileCheck[] = [];
  for (const f of rel.files) {
    const path = pathForKey(keyOf(releaseId, f.format));
    const size = await stat(path).then((s) => s.size, () => null);
    const actual = size === null ? null : await sha256File(path);
    const problem =
      size === null ? "The stored file is missing" : actual !== f.sha256 ? "The SHA-256 of the stored file differs from the one fixed at release" : size !== f.sizeBytes ? "The size differs" : null;
    items.push({ name: f.name, format: f.format, sizeBytes: f.sizeBytes, expectedSha256: f.sha256, actualSha256: actual, ok: problem === null, problem });
  }
  return { releaseId, checkedAt: new Date().toISOString(), ok: items.length > 0 && items.every((i) => i.ok), items };
}
