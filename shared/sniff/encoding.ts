/**
 * Encoding checks on the first bytes of a file. Tauline reads UTF-8 (with or without a byte-order mark); other
 * encodings are refused with a reason the user can act on. Pure: runs in the browser and on the server.
 */

export type EncodingVerdict =
  | { ok: true; encoding: "utf-8" | "utf-8-bom"; bomBytes: number }
  | { ok: false; code: "empty" | "utf16" | "utf32" | "binary" | "invalid_utf8"; message: string; line?: number };

const SAVE_AS = "Save or export the file as UTF-8 text (CSV UTF-8) and upload it again.";

/** 1-based line number of byte `offset` (counts LF bytes before it). */
function lineAt(bytes: Uint8Array, offset: number): number {
  let n = 1;
  for (let i = 0; i < offset && i < bytes.length; i++) if (bytes[i] === 10) n++;
  return n;
}

/**
 * Offset of the first byte that breaks UTF-8, or -1. A multi-byte sequence cut off by the end of `bytes` is
 * accepted when `complete` is false (the head of a longer file). O(n).
 */
export function firstInvalidUtf8(bytes: Uint8Array, complete: boolean): number {
  const n = bytes.length;
  let i = 0;
  while (i < n) {
    const b = bytes[i]!;
    if (b < 0x80) {
      i++;
      continue;
    }
    let need: number;
    let min: number;
    if (b >= 0xc2 && b <= 0xdf) (need = 1), (min = 0x80);
    else if (b >= 0xe0 && b <= 0xef) (need = 2), (min = 0x800);
    else if (b >= 0xf0 && b <= 0xf4) (need = 3), (min = 0x10000);
    else return i;
    if (i + need >= n) {
      // The sequence runs past the end of the bytes we have.
      if (!complete) {
        for (let k = i + 1; k < n; k++) if ((bytes[k]! & 0xc0) !== 0x80) return i;
        return -1;
      }
      return i;
    }
    let cp = b & (0x3f >> need);
    for (let k = 1; k <= need; k++) {
      const c = bytes[i + k]!;
      if ((c & 0xc0) !== 0x80) return i;
      cp = (cp << 6) | (c & 0x3f);
    }
    if (cp < min || cp > 0x10ffff || (cp >= 0xd800 && cp <= 0xdfff)) return i;
    i += need + 1;
  }
  return -1;
}

/**
 * Decides whether the file starting with `head` is text Tauline can read. `complete` says whether `head` is the
 * whole file. Checks, in order: empty, UTF-32/UTF-16 byte-order marks, NUL and other control bytes (binary),
 * invalid UTF-8. O(n).
 */
export function detectEncoding(head: Uint8Array, complete: boolean): EncodingVerdict {
  if (head.length === 0) return { ok: false, code: "empty", message: "The file is empty (0 bytes). Choose the logger export that holds the data." };
  const [b0, b1, b2, b3] = [head[0], head[1], head[2], head[3]];
  if ((b0 === 0xff && b1 === 0xfe && b2 === 0 && b3 === 0) || (b0 === 0 && b1 === 0 && b2 === 0xfe && b3 === 0xff)) {
    return { ok: false, code: "utf32", message: `The file is UTF-32 text (it starts with a UTF-32 byte-order mark). Tauline reads UTF-8. ${SAVE_AS}` };
  }
  if ((b0 === 0xff && b1 === 0xfe) || (b0 === 0xfe && b1 === 0xff)) {
    const order = b0 === 0xff ? "little-endian" : "big-endian";
    return { ok: false, code: "utf16", message: `The file is UTF-16 text (${order}, with a byte-order mark). Tauline reads UTF-8. ${SAVE_AS}` };
  }
  const bom = b0 === 0xef && b1 === 0xbb && b2 === 0xbf ? 3 : 0;
  let controls = 0;
  for (let i = bom; i < head.length; i++) {
    const c = head[i]!;
    if (c === 0) {
      return { ok: false, code: "binary", line: lineAt(head, i), message: `Line ${lineAt(head, i)} holds a NUL byte (byte ${i + 1}): this is a binary file, not a text logger export. Export the data as CSV or text.` };
    }
    // Tab, LF, CR and form feed are fine in text; other C0 controls are not.
    if (c < 32 && c !== 9 && c !== 10 && c !== 13 && c !== 12) controls++;
  }
  if (controls > 0 && controls * 100 > head.length) {
    return { ok: false, code: "binary", message: `The file holds ${controls} control bytes in its first ${head.length} bytes: this is a binary file, not a text logger export. Export the data as CSV or text.` };
  }
  const bad = firstInvalidUtf8(bom ? head.subarray(bom) : head, complete);
  if (bad >= 0) {
    const at = bad + bom;
    const byte = head[at]!.toString(16).toUpperCase().padStart(2, "0");
    return {
      ok: false,
      code: "invalid_utf8",
      line: lineAt(head, at),
      message: `Line ${lineAt(head, at)} holds byte 0x${byte}, which is not UTF-8: the file is in another encoding (often Latin-1 or Windows-1252). ${SAVE_AS}`,
    };
  }
  return bom ? { ok: true, encoding: "utf-8-bom", bomBytes: 3 } : { ok: true, encoding: "utf-8", bomBytes: 0 };
}
