/**
 * Encodes engine output as PostgreSQL binary COPY rows. Binary spares the server parsing ~40 numbers per row as text
 * (the pipeline's hot path); layout per the PostgreSQL manual, "COPY — Binary Format": a signature header, then per
 * row an int16 field count and per field an int32 byte length (−1 = NULL) and the value in network byte order.
 */
import { FLAG_ORDER, flagIndex } from "../db/record-flags";

/** Epoch seconds of PostgreSQL's timestamp origin, 2000-01-01T00:00:00Z. */
const PG_EPOCH_S = 946_684_800;
const TWO32 = 4_294_967_296;

/** The 19-byte file header: signature, flags (0), header-extension length (0). */
export function copyHeader(): Buffer {
  const b = Buffer.alloc(19);
  b.write("PGCOPY\n\xff\r\n\0", 0, "latin1");
  b.writeInt32BE(0, 11);
  b.writeInt32BE(0, 15);
  return b;
}

/** The file trailer: a field count of −1. */
export function copyTrailer(): Buffer {
  const b = Buffer.alloc(2);
  b.writeInt16BE(-1, 0);
  return b;
}

function uuidBytes(id: string): Buffer {
  const hex = id.replace(/-/g, "");
  if (!/^[0-9a-f]{32}$/i.test(hex)) throw new Error(`not a uuid: ${id}`);
  return Buffer.from(hex, "hex");
}

/** Rows to encode: columns of one block plus which of them to take. */
export interface RecordRows {
  n: number;
  time: Float64Array;
  /** Platform key per row (index into `platformKeys`), or null when every row is the single platform "". */
  platform: Int32Array | null;
  values: Float64Array[];
  flags: Uint8Array[];
  /** Row indexes to write, in order. */
  take: Int32Array;
  takeCount: number;
}

/**
 * Builds the encoder for one build: fixed leading columns (dataset_id, platform, time, valid_from), one value per
 * variable, then `flags` — FLAG_ORDER.length bytes, each variable's flag at its place (0 for variables this build
 * does not have). Matches `columnList`. NaN values are written as NULL.
 */
export function createRecordEncoder(datasetId: string, validFrom: number, variables: readonly string[], platformKeys: readonly string[]) {
  const ds = uuidBytes(datasetId);
  const d0 = ds.readUInt32BE(0), d1 = ds.readUInt32BE(4), d2 = ds.readUInt32BE(8), d3 = ds.readUInt32BE(12);
  const nv = variables.length;
  const fieldCount = 4 + nv + 1;
  const flagBytes = FLAG_ORDER.length;
  const at = Int32Array.from(variables, flagIndex);
  // Places of variables this build does not have: zeroed in each row (cheaper than clearing all of them).
  const absent = Int32Array.from(FLAG_ORDER.keys()).filter((k) => !at.includes(k));
  const keyBytes = new Map<number, Buffer>();
  const keyOf = (p: number) => {
    let b = keyBytes.get(p);
    if (!b) {
      b = Buffer.from(platformKeys[p] ?? "", "utf8");
      keyBytes.set(p, b);
    }
    return b;
  };
  const columnList = ["dataset_id", "platform", "time", "valid_from", ...variables.map((v) => `"${v}"`), "flags"].join(", ");
  // Fixed bytes per row without the platform text: count + uuid + platform length + time + valid_from + values + flags.
  const fixed = 2 + (4 + 16) + 4 + (4 + 8) + (4 + 4) + nv * (4 + 8) + (4 + flagBytes);

  return {
    columnList,
    encode(r: RecordRows): Buffer {
      let maxKey = 0;
      for (const b of keyBytes.values()) if (b.length > maxKey) maxKey = b.length;
      if (r.platform) for (let k = 0; k < r.takeCount; k++) keyOf(r.platform[r.take[k]!]!);
      for (const b of keyBytes.values()) if (b.length > maxKey) maxKey = b.length;
      const buf = Buffer.allocUnsafe(r.takeCount * (fixed + maxKey));
      const dv = new DataView(buf.buffer, buf.byteOffset, buf.length);
      const { time, values, flags, take } = r;
      let o = 0;
      for (let k = 0; k < r.takeCount; k++) {
        const i = take[k]!;
        dv.setInt16(o, fieldCount);
        o += 2;
        // The dataset id by plain stores: a Buffer.copy per row is a call into the runtime for 16 bytes.
        dv.setInt32(o, 16);
        dv.setUint32(o + 4, d0);
        dv.setUint32(o + 8, d1);
        dv.setUint32(o + 12, d2);
        dv.setUint32(o + 16, d3);
        o += 20;
        const key = r.platform ? keyOf(r.platform[i]!) : null;
        if (key && key.length) {
          dv.setInt32(o, key.length);
          key.copy(buf, o + 4);
          o += 4 + key.length;
        } else {
          dv.setInt32(o, 0);
          o += 4;
        }
        // timestamptz: int64 microseconds since 2000-01-01, split in two words (exact below 2^53 µs).
        const us = Math.round((time[i]! - PG_EPOCH_S) * 1e6);
        const hi = Math.floor(us / TWO32);
        dv.setInt32(o, 8);
        dv.setInt32(o + 4, hi);
        dv.setUint32(o + 8, us - hi * TWO32);
        o += 12;
        dv.setInt32(o, 4);
        dv.setInt32(o + 4, validFrom);
        o += 8;
        for (let v = 0; v < nv; v++) {
          const x = values[v]![i]!;
          if (x === x) {
            dv.setInt32(o, 8);
            dv.setFloat64(o + 4, x);
            o += 12;
          } else {
            dv.setInt32(o, -1);
            o += 4;
          }
        }
        dv.setInt32(o, flagBytes);
        o += 4;
        for (let z = 0; z < absent.length; z++) buf[o + absent[z]!] = 0;
        for (let v = 0; v < nv; v++) buf[o + at[v]!] = flags[v]![i]!;
        o += flagBytes;
      }
      return buf.subarray(0, o);
    },
  };
}

/** Bucket arrays of one plot series, as written to plot_series. */
export interface PlotSeriesArrays {
  platform: string;
  variable: string;
  stepS: number;
  t0: number;
  min: ArrayLike<number>;
  max: ArrayLike<number>;
  mean: ArrayLike<number>;
  n: ArrayLike<number>;
  worstFlag: ArrayLike<number>;
}

/**
 * One plot_series row in binary COPY form (columns version_id, platform, variable, step_s, t0, min, max, mean, n,
 * worst_flag). The bucket arrays are bytea fields of big-endian elements (server/db/plot-arrays.ts): float4 min, max
 * and mean, int4 n, int2 worst flag.
 */
export function encodePlotSeriesRow(versionId: string, r: PlotSeriesArrays): Buffer {
  const plat = Buffer.from(r.platform, "utf8");
  const variable = Buffer.from(r.variable, "utf8");
  const len = r.min.length;
  const size = 2 + 20 + 4 + plat.length + 4 + variable.length + 8 + 12 + 5 * 4 + len * (4 * 4 + 2);
  const buf = Buffer.allocUnsafe(size);
  const dv = new DataView(buf.buffer, buf.byteOffset, buf.length);
  let o = 0;
  dv.setInt16(o, 10);
  o += 2;
  dv.setInt32(o, 16);
  uuidBytes(versionId).copy(buf, o + 4);
  o += 20;
  for (const b of [plat, variable]) {
    dv.setInt32(o, b.length);
    b.copy(buf, o + 4);
    o += 4 + b.length;
  }
  dv.setInt32(o, 4);
  dv.setInt32(o + 4, r.stepS);
  o += 8;
  dv.setInt32(o, 8);
  dv.setFloat64(o + 4, r.t0);
  o += 12;
  for (const a of [r.min, r.max, r.mean]) {
    dv.setInt32(o, len * 4);
    o += 4;
    for (let i = 0; i < len; i++, o += 4) dv.setFloat32(o, a[i]!);
  }
  dv.setInt32(o, len * 4);
  o += 4;
  for (let i = 0; i < len; i++, o += 4) dv.setInt32(o, r.n[i]!);
  dv.setInt32(o, len * 2);
  o += 4;
  for (let i = 0; i < len; i++, o += 2) dv.setInt16(o, r.worstFlag[i]!);
  return buf.subarray(0, o);
}
