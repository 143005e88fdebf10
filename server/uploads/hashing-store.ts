import { createHash, type Hash } from "node:crypto";
import { createReadStream } from "node:fs";
import type http from "node:http";
import path from "node:path";
import { Transform, type Readable } from "node:stream";
import { FileStore } from "@tus/file-store";

/**
 * A tus FileStore that hashes bytes on their way to disk, so the SHA-256 is ready when the last byte lands. The
 * hash state lives in memory; after a restart or an interrupted write whose bytes cannot be accounted for, the
 * next write first catches up by hashing what is already on disk.
 */
export class HashingFileStore extends FileStore {
  private hashes = new Map<string, { hash: Hash; offset: number }>();

  private async catchUp(id: string, path: string, offset: number): Promise<{ hash: Hash; offset: number }> {
    const hash = createHash("sha256");
    if (offset > 0) {
      for await (const chunk of createReadStream(path, { start: 0, end: offset - 1, highWaterMark: 1 << 20 })) hash.update(chunk as Buffer);
    }
    const state = { hash, offset };
    this.hashes.set(id, state);
    return state;
  }

  override async write(readable: http.IncomingMessage | Readable, id: string, offset: number): Promise<number> {
    let state = this.hashes.get(id);
    if (!state || state.offset !== offset) state = await this.catchUp(id, path.join(this.directory, id), offset);
    let seen = 0;
    const s = state;
    const tap = new Transform({
      transform(chunk: Buffer, _enc, cb) {
        s.hash.update(chunk);
        seen += chunk.length;
        cb(null, chunk);
      },
    });
    readable.on("error", (e) => tap.destroy(e));
    try {
      const end = await super.write(readable.pipe(tap), id, offset);
      if (end === offset + seen) s.offset = end;
      else this.hashes.delete(id);
      return end;
    } catch (e) {
      this.hashes.delete(id);
      throw e;
    }
  }

  /** SHA-256 (hex) of the whole file once `size` bytes are written; reads the file when the state was lost. */
  async digest(id: string, size: number): Promise<string> {
    const s = this.hashes.get(id);
    this.hashes.delete(id);
    if (s && s.offset === size) return s.hash.digest("hex");
    const fresh = await this.catchUp(id, path.join(this.directory, id), size);
    this.hashes.delete(id);
    return fresh.hash.digest("hex");
  }

  forget(id: string) {
    this.hashes.delete(id);
  }

  override async remove(id: string): Promise<void> {
    this.hashes.delete(id);
    await super.remove(id);
  }
}
