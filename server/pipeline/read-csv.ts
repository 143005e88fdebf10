import { createReadStream } from "node:fs";
import Papa from "papaparse";
import type { ColumnMap } from "../../shared/schemas/column-map";
import { createCanonicalizer, type Canonicalizer, type ParseWarning, type RecordChunk } from "../../shared/compute/canonical";
import { splitLine } from "../../shared/sniff/dialect";

/**
 * Streaming ingest shared by the worker (server/pipeline/build.ts) and `tauline check` (cli/check.ts): a delimited
 * file → papaparse in pieces of whole lines → the pure column-map canonicalizer → canonical chunks.
 */

/** A readable problem with an input file, with the line and column when known. */
export class InputError extends Error {
  constructor(
    message: string,
    readonly line?: number,
    readonly column?: string,
  ) {
    super(message);
  }
}

/**
 * Rows of a piece of delimited text by papaparse's core parser (`Papa.Parser`; quotes per RFC 4180). `Papa.parse` on
 * a string wraps the same parser in a streamer whose bookkeeping keeps each piece's rows alive across collections;
 * calling the core directly parses a month at 1 Hz in about half the time with a fraction of the garbage
 * (DEVELOPERS.md, "Pipeline pacing"). The line ending is the piece's first one, as papaparse would guess it.
 * The benches time their papaparse side through this function too, so both sides of a ratio parse alike.
 */
export function parseDelimited(text: string, delimiter: string): string[][] {
  const nl = text.indexOf("\n");
  const newline = nl > 0 && text.charCodeAt(nl - 1) === 13 ? "\r\n" : nl < 0 && text.includes("\r") ? "\r" : "\n";
  return new Papa.Parser({ delimiter, newline }).parse(text, 0, false).data as string[][];
}

export interface CanonicalStream {
  canonicalizer: Canonicalizer;
  chunks: AsyncGenerator<{ chunk: RecordChunk; warnings: ParseWarning[] }>;
  /** Stops reading and releases the file, whether or not chunks were taken. */
  close(): void;
}

export interface StreamOptions {
  /** Bytes per read (default 4 MiB): the size of the pieces handed to the parser. */
  chunkBytes?: number;
  /** How the file is named in messages (default: its path). The server passes the upload's original name. */
  label?: string;
  /** Called with the byte count read so far (for progress). */
  onBytes?: (bytes: number) => void;
}

/**
 * Streams a delimited file through a column map into canonical chunks (I/O side of the ingest; the conversion
 * itself is the pure `createCanonicalizer`). Assumes one record per line (no line breaks inside quoted fields).
 * Throws InputError for an unreadable file or a header that does not match the map.
 */
export async function openCanonicalStream(path: string, map: ColumnMap, opts: StreamOptions | number = {}): Promise<CanonicalStream> {
  const o: StreamOptions = typeof opts === "number" ? { chunkBytes: opts } : opts;
  const label = o.label ?? path;
  const canonicalizer = createCanonicalizer(map);
  const stream = createReadStream(path, { encoding: "utf8", highWaterMark: o.chunkBytes ?? 4 << 20 });
  const it = stream[Symbol.asyncIterator]() as AsyncIterator<string>;
  let carry = "";
  let firstRead = true;
  let line = 1;
  let done = false;
  // "Spaces" means runs of blanks and tabs, as the upload sniffer reads it (shared/sniff splitLine).
  const parse =
    map.delimiter === " "
      ? (text: string) => text.split(/\r\n|\n|\r/).map((l) => splitLine(l, " "))
      : (text: string) => parseDelimited(text, map.delimiter);

  /** Next piece of text holding whole lines, or null at the end. */
  const nextPiece = async (): Promise<string | null> => {
    while (!done) {
      let r: IteratorResult<string>;
      try {
        r = await it.next();
      } catch (e) {
        throw new InputError(`cannot read ${label}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
      }
      if (r.done) {
        done = true;
        break;
      }
      o.onBytes?.(stream.bytesRead);
      // A byte-order mark is not part of the first header name.
      carry += firstRead && r.value.charCodeAt(0) === 0xfeff ? r.value.slice(1) : r.value;
      firstRead = false;
      const cut = carry.lastIndexOf("\n");
      if (cut >= 0) {
        const piece = carry.slice(0, cut + 1);
        carry = carry.slice(cut + 1);
        return piece;
      }
    }
    if (carry.length > 0) {
      const piece = carry;
      carry = "";
      return piece;
    }
    return null;
  };

  // Header and skipped lines.
  let pending: string[][] = [];
  const takeLines = async (count: number): Promise<string[][]> => {
    while (pending.length < count) {
      const piece = await nextPiece();
      if (piece === null) break;
      const rows = parse(piece);
      if (piece.endsWith("\n") && rows.length && rows[rows.length - 1]!.length === 1 && rows[rows.length - 1]![0] === "") rows.pop();
      pending = pending.concat(rows);
    }
    const out = pending.slice(0, count);
    pending = pending.slice(count);
    return out;
  };

  try {
    return await openStream();
  } catch (e) {
    stream.destroy();
    throw e;
  }

  async function openStream(): Promise<CanonicalStream> {
    let header: string[] | null = null;
    if (map.headerRow > 0) {
      const head = await takeLines(map.headerRow + map.skipRows);
      if (head.length < map.headerRow) throw new InputError(`${label}: the file ends before its header row (line ${map.headerRow})`, map.headerRow);
      header = head[map.headerRow - 1]!;
      line = map.headerRow + map.skipRows + 1;
    } else if (map.skipRows > 0) {
      await takeLines(map.skipRows);
      line = map.skipRows + 1;
    }
    const bound = canonicalizer.bindHeader(header, map.headerRow);
    if (!bound.ok) throw new InputError(`${label}: ${bound.error}`, map.headerRow || undefined);

    async function* chunks() {
      try {
        if (pending.length) {
          const rows = pending;
          pending = [];
          const r = canonicalizer.convert(rows, line);
          line += rows.length;
          yield r;
        }
        for (;;) {
          const piece = await nextPiece();
          if (piece === null) return;
          const rows = parse(piece);
          if (piece.endsWith("\n") && rows.length && rows[rows.length - 1]!.length === 1 && rows[rows.length - 1]![0] === "") rows.pop();
          const r = canonicalizer.convert(rows, line);
          line += rows.length;
          yield r;
        }
      } finally {
        stream.destroy();
      }
    }
    return { canonicalizer, chunks: chunks(), close: () => void stream.destroy() };
  }
}
