import { mkdirSync } from "node:fs";
import path from "node:path";
import { env } from "../env";

/**
 * The only place that turns server ids into paths under the storage folder. Client file names never
 * reach the file system: keys are built from server-generated ids and checked against a strict pattern.
 */
const root = path.resolve(env.STORAGE_DIR);
const KEY = /^[a-z]+\/[0-9a-f][0-9a-f-]{7,63}$/;

export function storageRoot(): string {
  mkdirSync(root, { recursive: true });
  return root;
}

/** Folder for one kind of stored object (e.g. "uploads"), created on demand. */
export function storageDir(kind: "uploads" | "tus" | "exports"): string {
  const dir = path.join(storageRoot(), kind);
  mkdirSync(dir, { recursive: true });
  return dir;
}

/** Storage key of a completed upload, e.g. "uploads/6f1c…". */
export function uploadKey(uploadId: string): string {
  return checkKey(`uploads/${uploadId}`);
}

/** Storage key of an unfinished resumable upload's data file (the tus id is server-made, see server/uploads/tus.ts). */
export function tusPartKey(tusId: string): string {
  return checkKey(`tus/${tusId}`);
}

/** Storage key of a whole-release download file: the release id and the format's number (1 csv, 2 data package, 3 parquet). */
export function releaseFileKey(releaseId: string, formatNumber: 1 | 2 | 3): string {
  return checkKey(`exports/${releaseId}-${formatNumber}`);
}

/** Absolute path of a stored object from its key. Throws on anything that is not a key we made. */
export function pathForKey(key: string): string {
  checkKey(key);
  return path.join(storageRoot(), key);
}

function checkKey(key: string): string {
  if (!KEY.test(key)) throw new Error(`not a storage key: ${JSON.stringify(key)}`);
  return key;
}
