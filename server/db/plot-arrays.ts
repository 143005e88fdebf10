/**
 * The bucket arrays of `plot_series` (min, max, mean, n, worst_flag) are stored as `bytea`, each element big-endian
 * (network byte order, as PostgreSQL's own float4send/int4send/int2send write them; drizzle/0017_plot_series_bytea.sql):
 * min, max and mean as float4, n as int4, worst_flag as int2. A build writes ~10 M such elements for a month at
 * 1 Hz; as `real[]` PostgreSQL received them one function call at a time (~0.35 s of a build), as bytea it copies
 * bytes. Readers decode with the functions below; SQL takes a range of buckets with `substring(col from …)`.
 */

const view = (b: Uint8Array) => new DataView(b.buffer, b.byteOffset, b.byteLength);

/** float4 elements of a bytea value. */
export function readF4(b: Uint8Array): Float32Array {
  const dv = view(b);
  const out = new Float32Array(b.byteLength >> 2);
  for (let i = 0; i < out.length; i++) out[i] = dv.getFloat32(i << 2);
  return out;
}

/** int4 elements of a bytea value. */
export function readI4(b: Uint8Array): Int32Array {
  const dv = view(b);
  const out = new Int32Array(b.byteLength >> 2);
  for (let i = 0; i < out.length; i++) out[i] = dv.getInt32(i << 2);
  return out;
}

/** int2 elements of a bytea value. */
export function readI2(b: Uint8Array): Int16Array {
  const dv = view(b);
  const out = new Int16Array(b.byteLength >> 1);
  for (let i = 0; i < out.length; i++) out[i] = dv.getInt16(i << 1);
  return out;
}

/** int2 elements as a bytea value (for updating worst flags). */
export function writeI2(a: ArrayLike<number>): Buffer {
  const b = Buffer.allocUnsafe(a.length * 2);
  for (let i = 0; i < a.length; i++) b.writeInt16BE(a[i]!, i * 2);
  return b;
}

/** float4 elements as a bytea value. */
export function writeF4(a: ArrayLike<number>): Buffer {
  const b = Buffer.allocUnsafe(a.length * 4);
  for (let i = 0; i < a.length; i++) b.writeFloatBE(a[i]!, i * 4);
  return b;
}

/** int4 elements as a bytea value. */
export function writeI4(a: ArrayLike<number>): Buffer {
  const b = Buffer.allocUnsafe(a.length * 4);
  for (let i = 0; i < a.length; i++) b.writeInt32BE(a[i]!, i * 4);
  return b;
}

/** A plot_series row with its worst flags and counts decoded into plain arrays (the other fields as they were). */
export function decodeFlagsAndCounts<R extends { worst_flag: Uint8Array; n: Uint8Array }>(r: R): Omit<R, "worst_flag" | "n"> & { worst_flag: number[]; n: number[] } {
  return { ...r, worst_flag: Array.from(readI2(r.worst_flag)), n: Array.from(readI4(r.n)) };
}
