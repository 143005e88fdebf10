import { createReadStream } from "node:fs";
import { open, rename, unlink } from "node:fs/promises";
import { and, desc, eq } from "drizzle-orm";
import type { Upload } from "@tus/utils";
import { columnMapSchema } from "@shared/schemas/column-map";
import type { DatasetUploads, PreviewQuery, UploadDetail, UploadSummary } from "@shared/schemas/uploads";
import { createScanner, detectEncoding, previewRows, sniffDialect, suggestColumnMap, type Dialect, type ScanResult } from "@shared/sniff";
import { db } from "../db/client";
import { columnMaps, datasets, deployments, platforms, uploadInspections, uploads, user as users } from "../db/schema";
import { AppError, forbidden, notFound } from "../lib/errors";
import { pathForKey, storageDir, tusPartKey, uploadKey } from "../lib/file-store";
import { enqueue, type QueueSettings } from "../jobs/queue";
import { logger } from "../lib/logger";
import type { SessionUser } from "../middleware/require-session";
import { assertProjectAccess } from "./access";
import { writeAudit } from "./audit";
import type { HashingFileStore } from "../uploads/hashing-store";
import { storageFailure } from "../uploads/storage-failure";

/** Bytes read at finish to decide encoding and dialect; a first line longer than this is refused. */
const HEAD_BYTES = (1 << 20) + 4;
/** Bytes read for the preview table (50 rows of even a wide logger file fit). */
const PREVIEW_BYTES = 512 * 1024;

const unprocessable = (message: string) => new AppError("unprocessable", message, 422);

async function datasetProject(datasetId: string) {
  const [d] = await db.select({ projectId: datasets.projectId }).from(datasets).where(eq(datasets.id, datasetId));
  return d?.projectId ?? null;
}

/** Contributors and curators of the dataset's project (and admins) may upload to it; anyone else gets 403. */
export async function assertCanUploadTo(user: SessionUser, datasetId: string): Promise<void> {
  const projectId = /^[0-9a-f-]{36}$/i.test(datasetId) ? await datasetProject(datasetId) : null;
  if (!projectId) throw forbidden("You cannot upload to this dataset: it does not exist or is not in one of your projects.");
  await assertProjectAccess(user, projectId, "contribute");
}

async function readHead(path: string, bytes: number): Promise<Buffer> {
  const fh = await open(path, "r");
  try {
    const buf = Buffer.alloc(bytes);
    const { bytesRead } = await fh.read(buf, 0, bytes, 0);
    return buf.subarray(0, bytesRead);
  } finally {
    await fh.close();
  }
}

/** Decodes the head of a file: BOM dropped, bytes that are not UTF-8 become U+FFFD (the scan reports them). */
function decodeHead(head: Uint8Array, bomBytes: number): string {
  return new TextDecoder("utf-8").decode(head.subarray(bomBytes));
}

/**
 * Called by tus when the last byte of an upload has landed. Decides from the head whether the file is readable
 * text (refusing empty, binary, UTF-16, non-UTF-8, header-only and one-giant-line files with a reason, and deleting
 * them), then moves it under its upload key and records the upload, its inspection and an audit row together.
 * Small files are scanned completely here; larger ones are scanned in the background.
 */
export async function recordFinishedUpload(store: HashingFileStore, user: SessionUser, upload: Upload): Promise<void> {
  const id = upload.id;
  const size = upload.size ?? upload.offset;
  const partPath = pathForKey(tusPartKey(id));
  const datasetId = upload.metadata?.datasetId ?? "";
  const refuseAndDelete = async (message: string): Promise<never> => {
    await store.remove(id).catch(() => undefined);
    throw unprocessable(message);
  };

  const head = await readHead(partPath, HEAD_BYTES);
  const complete = head.length >= size;
  const verdict = detectEncoding(head, complete);
  if (!verdict.ok) return refuseAndDelete(verdict.message);
  const text = decodeHead(head, verdict.bomBytes);
  if (!complete && !/[\r\n]/.test(text)) {
    return refuseAndDelete(`Line 1 is longer than ${(HEAD_BYTES - 4).toLocaleString("en-GB")} characters. A logger record is one short line: check that the file has line breaks.`);
  }
  const sniff = sniffDialect(text, complete);
  let scan: ScanResult | null = null;
  if (complete) {
    const scanner = createScanner(sniff.dialect, sniff.header);
    scanner.push(text);
    scan = scanner.finish();
    if (scan.status === "unusable") return refuseAndDelete(scan.findings.filter((f) => f.severity === "error").map((f) => f.message).join(" "));
  }

  const key = uploadKey(id);
  const finalPath = pathForKey(key);
  try {
    const sha256 = await store.digest(id, size);
    storageDir("uploads");
    await rename(partPath, finalPath);
    await db.transaction(async (tx) => {
      await tx.insert(uploads).values({ id, datasetId, uploaderId: user.id, originalName: upload.metadata?.originalName ?? "unnamed file", storageKey: key, sizeBytes: size, sha256 });
      await tx.insert(uploadInspections).values({
        uploadId: id,
        encoding: verdict.encoding,
        dialect: sniff.dialect,
        status: scan ? scan.status : "checking",
        dataLineCount: scan?.dataLineCount ?? null,
        findings: scan?.findings ?? null,
        checkedAt: scan ? new Date() : null,
      });
      await writeAudit(tx, { actorId: user.id, action: "upload.recorded", entityType: "upload", entityId: id, toState: "recorded", details: { datasetId, sizeBytes: size, sha256, originalName: upload.metadata?.originalName } });
    });
  } catch (e) {
    // Nothing half-stored: drop the file wherever it is, so the client's next HEAD finds no upload and starts over
    // (a complete-looking part would make a resuming client believe it had finished).
    await unlink(finalPath).catch(() => undefined);
    await store.remove(id).catch(() => undefined);
    await store.configstore.delete(id).catch(() => undefined);
    const storage = storageFailure(e);
    if (storage) throw new AppError("unavailable", storage.message, storage.status, undefined, { cause: e });
    throw new AppError("internal", "The file arrived but could not be recorded. Upload it again.", 500, undefined, { cause: e });
  }
  await store.configstore.delete(id).catch(() => undefined);
  if (!scan) requestInspection(id);
}

/** Queue of the full-file scan of a stored upload (run by workers: server/jobs/inspect-upload.job.ts). */
export const INSPECT_UPLOAD = "inspect-upload";
/** At most one queued and one running scan per upload, however often its page asks. */
export const INSPECT_UPLOAD_QUEUE: QueueSettings = { policy: "stately" };

/**
 * Asks a worker to scan a stored upload end to end. A 5 GB file is minutes of CPU, which belongs on a worker,
 * not on an app server's event loop. One job per upload at a time (the key); failures are logged, and the
 * upload's page asks again while its inspection still says "checking".
 */
export function requestInspection(uploadId: string): void {
  enqueue(INSPECT_UPLOAD, { uploadId }, { singletonKey: uploadId, retryLimit: 3, retryDelay: 10 }, INSPECT_UPLOAD_QUEUE).catch((err) =>
    logger.error({ err, uploadId }, "could not queue the scan of an upload"),
  );
}

const running = new Map<string, Promise<void>>();

/** Scans a stored upload end to end and records what it found. One scan per upload at a time in this process. */
export function inspectStoredUpload(uploadId: string): Promise<void> {
  const existing = running.get(uploadId);
  if (existing) return existing;
  const p = (async () => {
    const [row] = await db.select().from(uploadInspections).where(eq(uploadInspections.uploadId, uploadId));
    if (!row || row.status !== "checking") return;
    const dialect = row.dialect as Dialect;
    const headText = decodeHead(await readHead(pathForKey(uploadKey(uploadId)), 64 * 1024), row.encoding === "utf-8-bom" ? 3 : 0);
    const { header } = previewRows(headText, dialect, 1, false);
    const scanner = createScanner(dialect, header);
    const decoder = new TextDecoder("utf-8");
    let result: ScanResult;
    try {
      // Small pieces with a yield between them, so the scan never holds the worker's event loop (heartbeats, other jobs) for long.
      for await (const chunk of createReadStream(pathForKey(uploadKey(uploadId)), { highWaterMark: 256 * 1024 })) {
        scanner.push(decoder.decode(chunk as Buffer, { stream: true }));
        await new Promise((r) => setImmediate(r));
      }
      scanner.push(decoder.decode());
      result = scanner.finish();
    } catch (err) {
      logger.error({ err, uploadId }, "upload scan failed");
      result = { status: "unusable", dataLineCount: 0, findings: [{ severity: "error", code: "unreadable", count: 0, lines: [], message: "The server could not read the stored file. Upload it again." }] };
    }
    await db
      .update(uploadInspections)
      .set({ status: result.status, dataLineCount: result.dataLineCount, findings: result.findings, checkedAt: new Date() })
      .where(and(eq(uploadInspections.uploadId, uploadId), eq(uploadInspections.status, "checking")));
  })().finally(() => running.delete(uploadId));
  running.set(uploadId, p);
  return p;
}

const summaryColumns = {
  id: uploads.id,
  datasetId: uploads.datasetId,
  originalName: uploads.originalName,
  sizeBytes: uploads.sizeBytes,
  sha256: uploads.sha256,
  uploaderName: users.name,
  createdAt: uploads.createdAt,
  status: uploadInspections.status,
};

function toSummary(r: { createdAt: Date; status: string | null } & Omit<UploadSummary, "createdAt" | "status">): UploadSummary {
  return { ...r, createdAt: r.createdAt.toISOString(), status: r.status as UploadSummary["status"] };
}

/**
 * Uploads of a dataset, newest first, with the dataset's platform and that platform's latest saved column map (the
 * browser checks a new file against it while it uploads). Members of the dataset's project (and admins) may list them.
 */
export async function listDatasetUploads(user: SessionUser | null | undefined, datasetId: string): Promise<DatasetUploads> {
  const projectId = await datasetProject(datasetId);
  if (!projectId) {
    if (!user) throw new AppError("unauthenticated", "Sign in to continue", 401);
    throw user.isAdmin ? notFound("Dataset") : forbidden("You are not a member of this project");
  }
  await assertProjectAccess(user, projectId, "read");
  const rows = await db
    .select(summaryColumns)
    .from(uploads)
    .leftJoin(users, eq(users.id, uploads.uploaderId))
    .leftJoin(uploadInspections, eq(uploadInspections.uploadId, uploads.id))
    .where(eq(uploads.datasetId, datasetId))
    .orderBy(desc(uploads.createdAt));
  const [p] = await db
    .select({ platformId: deployments.platformId })
    .from(datasets)
    .leftJoin(deployments, eq(deployments.id, datasets.deploymentId))
    .where(eq(datasets.id, datasetId));
  const platformId = p?.platformId ?? null;
  return { items: rows.map(toSummary), platformId, savedMap: platformId ? await latestColumnMap(platformId) : null };
}

/** The latest saved column map of a platform, or null. */
export async function latestColumnMap(platformId: string) {
  const [row] = await db.select().from(columnMaps).where(eq(columnMaps.platformId, platformId)).orderBy(desc(columnMaps.revision)).limit(1);
  if (!row) return null;
  const parsed = columnMapSchema.safeParse(row.map);
  return parsed.success ? parsed.data : null;
}

/**
 * One upload with the server's findings, the first 50 data rows read with the detected dialect (or the caller's
 * overrides) and a suggested column map (from the platform's last map when it fits, else from the headers).
 */
export async function getUploadDetail(user: SessionUser | null | undefined, uploadId: string, overrides: { delimiter?: Dialect["delimiter"]; decimalMark?: Dialect["decimalMark"]; headerRow?: number; skipRows?: number } = {}): Promise<UploadDetail> {
  const [row] = await db
    .select({
      ...summaryColumns,
      storageKey: uploads.storageKey,
      projectId: datasets.projectId,
      platformId: platforms.id,
      platformName: platforms.name,
      encoding: uploadInspections.encoding,
      detected: uploadInspections.dialect,
      dataLineCount: uploadInspections.dataLineCount,
      findings: uploadInspections.findings,
    })
    .from(uploads)
    .innerJoin(datasets, eq(datasets.id, uploads.datasetId))
    .leftJoin(deployments, eq(deployments.id, datasets.deploymentId))
    .leftJoin(platforms, eq(platforms.id, deployments.platformId))
    .leftJoin(users, eq(users.id, uploads.uploaderId))
    .leftJoin(uploadInspections, eq(uploadInspections.uploadId, uploads.id))
    .where(eq(uploads.id, uploadId));
  if (!row) {
    if (!user) throw new AppError("unauthenticated", "Sign in to continue", 401);
    throw user.isAdmin ? notFound("Upload") : forbidden("You are not a member of this project");
  }
  await assertProjectAccess(user, row.projectId, "read");
  if (row.status === "checking") requestInspection(uploadId);

  const detected = (row.detected as Dialect | null) ?? null;
  const dialect: Dialect | null = detected ? { ...detected, ...Object.fromEntries(Object.entries(overrides).filter(([, v]) => v !== undefined)) } : null;
  let preview: UploadDetail["preview"] = { header: null, rows: [], lines: [] };
  let suggestion: UploadDetail["suggestion"] = null;
  if (dialect) {
    const head = await readHead(pathForKey(row.storageKey), PREVIEW_BYTES);
    const text = decodeHead(head, row.encoding === "utf-8-bom" ? 3 : 0);
    const p = previewRows(text, dialect, 50, head.length >= row.sizeBytes);
    preview = { header: p.header, rows: p.rows, lines: p.lines };
    const previous = row.platformId ? await latestColumnMap(row.platformId) : null;
    suggestion = suggestColumnMap(p.header, p.rows, dialect, previous);
  }
  return {
    ...toSummary(row),
    projectId: row.projectId,
    platformId: row.platformId,
    platformName: row.platformName,
    encoding: row.encoding,
    detected,
    dialect,
    dataLineCount: row.dataLineCount,
    findings: (row.findings as UploadDetail["findings"] | null) ?? [],
    preview,
    suggestion,
  };
}

export type { PreviewQuery };
