import { logger } from "../lib/logger";

const FULL = new Set(["ENOSPC", "EDQUOT"]);
const UNWRITABLE = new Set(["EROFS", "EACCES", "EPERM", "ENOTDIR", "EISDIR", "EIO", "EEXIST", "ENOENT"]);
/** Calls that touch the storage folder; a dropped client connection never comes from these. */
const FS_CALLS = new Set(["open", "write", "writev", "rename", "mkdir", "fsync", "close", "unlink", "copyfile"]);

/**
 * A file-system failure while storing an upload (full disk, read-only or broken storage) as the answer a person can
 * act on: 507 when the storage is full, 503 when it cannot be written. Undefined for anything else.
 */
export function storageFailure(err: unknown): { status: number; message: string } | undefined {
  const e = err as NodeJS.ErrnoException | undefined;
  if (!e?.code || !e.syscall || !FS_CALLS.has(e.syscall)) return undefined;
  if (FULL.has(e.code)) {
    logger.error({ err }, "upload storage is full");
    return { status: 507, message: "The server's storage is full, so the file could not be stored and nothing was kept. Try again later or tell an admin." };
  }
  if (UNWRITABLE.has(e.code)) {
    logger.error({ err }, "upload storage is not writable");
    return { status: 503, message: "The file could not be stored: the server's storage is not writable right now and nothing was kept. Try again later or tell an admin." };
  }
  return undefined;
}
