import type { ColumnMap } from "../schemas/column-map";
import { findUnit } from "../units";
import { resolveVariable, vocabulary, type MeasuredVariable } from "../vocabulary";
import { wrap360 } from "./directions";

/**
 * A block of records in canonical form, column-wise: what the engine consumes. Times are epoch seconds (UTC),
 * values are in canonical units (shared/vocabulary.ts), NaN marks no value.
 */
export interface RecordChunk {
  n: number;
  time: Float64Array;
  /** Platform index per record (see `platformIds`), or null for single-platform files. */
  platform: Int32Array | null;
  /** 1-based source line per record, for messages. */
  line: Float64Array;
  values: Partial<Record<MeasuredVariable, Float64Array>>;
  /** 1 where a field was present but could not be read (syntax fail for that variable). */
  bad: Partial<Record<MeasuredVariable, Uint8Array>>;
  /** 1 where the whole record is unreadable: bad or missing time, too few fields. */
  recordBad: Uint8Array;
}

/** A problem found while reading a row: its 1-based file line, the column when known, and what was wrong. */
export interface ParseWarning {
  line: number;
  column?: string;
  message: string;
}

/** Exact powers of ten up to 10^15 (every one is a double without rounding). */
const POW10 = [1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15];

/**
 * A number field as text → its value, exactly `Number(text)` (with `comma`: `Number(text.replace(",", "."))`).
 * Plain decimals of at most 15 digits ("-12.31", "1015.99") take a fast path: the digits as an integer m < 10^15
 * and the count of decimals k, then m / 10^k. Both are exact doubles, so the one IEEE division is correctly
 * rounded, which is what `Number` returns (Clinger, "How to read floating point numbers accurately", PLDI 1990,
 * the fast path). Anything else (exponents, spaces, longer digit runs, words) goes to `Number`. O(length).
 */
export function parseDecimal(text: string, comma = false): number {
  const len = text.length;
  let i = 0;
  let c = text.charCodeAt(0);
  const neg = c === 45;
  if (neg || c === 43) i = 1;
  let m = 0;
  let digits = 0;
  let decimals = 0;
  let dot = false;
  for (; i < len; i++) {
    c = text.charCodeAt(i);
    const d = c - 48;
    if (d >= 0 && d <= 9) {
      m = m * 10 + d;
      digits++;
      if (dot) decimals++;
    } else if (!dot && (c === 46 || (comma && c === 44))) dot = true;
    else return Number(comma ? text.replace(",", ".") : text);
  }
  if (digits === 0 || digits > 15) return Number(comma ? text.replace(",", ".") : text);
  const x = m / POW10[decimals]!;
  return neg ? -x : x;
}

/** Pure date arithmetic: days since 1970-01-01 for a proleptic Gregorian date (Hinnant's days_from_civil). */
export function daysFromCivil(y: number, m: number, d: number): number {
  const yy = m <= 2 ? y - 1 : y;
  const era = Math.floor(yy / 400);
  const yoe = yy - era * 400;
  const doy = Math.floor((153 * (m + (m > 2 ? -3 : 9)) + 2) / 5) + d - 1;
  const doe = yoe * 365 + Math.floor(yoe / 4) - Math.floor(yoe / 100) + doy;
  return era * 146097 + doe - 719468;
}

const DAYS_IN_MONTH = [31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

function validDate(y: number, mo: number, d: number, h: number, mi: number, s: number): boolean {
  if (mo < 1 || mo > 12 || d < 1 || d > DAYS_IN_MONTH[mo - 1]!) return false;
  if (mo === 2 && d === 29 && !(y % 4 === 0 && (y % 100 !== 0 || y % 400 === 0))) return false;
  return h >= 0 && h <= 23 && mi >= 0 && mi <= 59 && s >= 0 && s < 61;
}

/** Parses "+hh:mm", "-hhmm", "Z" or "UTC" to an offset in seconds; NaN when unreadable. */
export function parseZone(z: string): number {
  if (z === "Z" || z === "UTC" || z === "z") return 0;
  const m = /^([+-])(\d{2}):?(\d{2})$/.exec(z);
  if (!m) return NaN;
  const s = Number(m[2]) * 3600 + Number(m[3]) * 60;
  return m[1] === "-" ? -s : s;
}

const digit = (s: string, i: number) => {
  const c = s.charCodeAt(i) - 48;
  return c >= 0 && c <= 9 ? c : NaN;
};

/**
 * ISO 8601 instant → epoch seconds. Accepts YYYY-MM-DD[T or space]hh:mm[:ss[.fff]] followed by Z, ±hh:mm or ±hhmm;
 * a time without a zone uses `defaultZoneS`, and is NaN when that is NaN (a syntax error). O(length).
 */
export function parseIsoTime(text: string, defaultZoneS = NaN): number {
  const c0 = text.charCodeAt(0);
  const cl = text.charCodeAt(text.length - 1);
  const s = c0 <= 32 || cl <= 32 ? text.trim() : text;
  if (s.length < 16 || s.charCodeAt(4) !== 45 || s.charCodeAt(7) !== 45 || s.charCodeAt(13) !== 58) return NaN;
  const sep = s.charCodeAt(10);
  if (sep !== 84 && sep !== 32 && sep !== 116) return NaN;
  const y = digit(s, 0) * 1000 + digit(s, 1) * 100 + digit(s, 2) * 10 + digit(s, 3);
  const mo = digit(s, 5) * 10 + digit(s, 6);
  const d = digit(s, 8) * 10 + digit(s, 9);
  const h = digit(s, 11) * 10 + digit(s, 12);
  const mi = digit(s, 14) * 10 + digit(s, 15);
  let i = 16;
  let sec = 0;
  if (s.charCodeAt(i) === 58) {
    sec = digit(s, i + 1) * 10 + digit(s, i + 2);
    i += 3;
    if (s.charCodeAt(i) === 46 || s.charCodeAt(i) === 44) {
      let j = i + 1;
      let frac = 0;
      let scale = 0.1;
      while (j < s.length) {
        const c = digit(s, j);
        if (Number.isNaN(c)) break;
        frac += c * scale;
        scale /= 10;
        j++;
      }
      if (j === i + 1) return NaN;
      sec += frac;
      i = j;
    }
  }
  if (Number.isNaN(y + mo + d + h + mi + sec) || !validDate(y, mo, d, h, mi, sec)) return NaN;
  const zone = i === s.length ? defaultZoneS : parseZone(s.slice(i));
  if (Number.isNaN(zone)) return NaN;
  return daysFromCivil(y, mo, d) * 86400 + h * 3600 + mi * 60 + sec - zone;
}

/** Compiles a pattern such as "DD/MM/YYYY hh:mm:ss" into a parser returning epoch seconds (NaN when unreadable). */
export function compileTimePattern(pattern: string, zoneS: number): (text: string) => number {
  const order: string[] = [];
  const re = pattern.replace(/YYYY|MM|DD|hh|mm|ss|[.*+?^${}()|[\]\\]/g, (tok) => {
    switch (tok) {
      case "YYYY":
        order.push("Y");
        return "(\\d{4})";
      case "ss":
        order.push("s");
        return "(\\d{1,2}(?:\\.\\d+)?)";
      case "MM":
      case "DD":
      case "hh":
      case "mm":
        order.push(tok);
        return "(\\d{1,2})";
      default:
        return "\\" + tok;
    }
  });
  const rx = new RegExp(`^${re}$`);
  return (text: string) => {
    const m = rx.exec(text.trim());
    if (!m) return NaN;
    let y = NaN, mo = NaN, d = NaN, h = 0, mi = 0, s = 0;
    order.forEach((k, i) => {
      const val = Number(m[i + 1]);
      if (k === "Y") y = val;
      else if (k === "MM") mo = val;
      else if (k === "DD") d = val;
      else if (k === "hh") h = val;
      else if (k === "mm") mi = val;
      else s = val;
    });
    if (Number.isNaN(y + mo + d) || !validDate(y, mo, d, h, mi, s) || Number.isNaN(zoneS)) return NaN;
    return daysFromCivil(y, mo, d) * 86400 + h * 3600 + mi * 60 + s - zoneS;
  };
}

interface BoundColumn {
  index: number;
  name: string;
  variable: MeasuredVariable;
  scale: number;
  offset: number;
  /** Bearings: degrees to add (180 for a flipped convention, plus declination), then wrap. NaN for non-bearings. */
  turn: number;
}

/** Whether the map's columns were all found, with a one-line reason when not. */
export type BindResult = { ok: true } | { ok: false; error: string };

/**
 * Turns rows of text fields into canonical `RecordChunk`s through a column map. Pure; keeps only the platform-id
 * table between calls. Cost O(rows × columns).
 */
export interface Canonicalizer {
  /** Resolves column names against the header row (or positions when the map has no header). */
  bindHeader(header: string[] | null, headerLine: number): BindResult;
  /** Converts data rows; `firstLine` is the 1-based file line of rows[0]. Blank rows are dropped. */
  convert(rows: string[][], firstLine: number): { chunk: RecordChunk; warnings: ParseWarning[] };
  /** Canonical variables this map fills. */
  readonly variables: MeasuredVariable[];
  /** Platform ids in order of first appearance; RecordChunk.platform indexes into this. */
  readonly platformIds: string[];
}

/** Creates a canonicalizer for a validated column map. */
export function createCanonicalizer(map: ColumnMap): Canonicalizer {
  const zoneS = map.time.zone === null ? NaN : parseZone(map.time.zone);
  const fmt = map.time.format;
  const parseTime: (t: string) => number =
    fmt === "iso8601"
      ? (t) => parseIsoTime(t, zoneS)
      : fmt === "epoch_seconds"
        ? (t) => (t.trim() === "" ? NaN : Number(t))
        : fmt === "epoch_milliseconds"
          ? (t) => (t.trim() === "" ? NaN : Number(t) / 1000)
          : compileTimePattern(fmt, Number.isNaN(zoneS) ? NaN : zoneS);
  const missing = new Set(map.missingValues.map((m) => m.trim()));
  // Codes such as -999 are compared as numbers first, then as text, so "-999.5" is not taken for "-999".
  const numericMissing = [...missing].map(Number).filter((m) => Number.isFinite(m) && m !== 0);
  const comma = map.decimalMark === ",";
  const variables = map.columns.map((c) => resolveVariable(c.variable)!.canonical);
  const platformIds: string[] = [];
  const platformIndex = new Map<string, number>();
  let bound: BoundColumn[] = [];
  let timeIdx: number[] = [];
  let timeNames: string[] = [];
  let platformIdx = -1;
  let maxIdx = 0;

  const resolve = (ref: string | number, header: string[] | null): number => {
    if (typeof ref === "number") return ref - 1;
    if (!header) return /^\d+$/.test(ref) ? Number(ref) - 1 : -1;
    return header.findIndex((h) => h.trim() === ref);
  };

  return {
    variables,
    platformIds,
    bindHeader(header, headerLine) {
      const where = header ? `the header on line ${headerLine}` : "the file (it has no header row)";
      const find = (ref: string | number): number | string => {
        const i = resolve(ref, header);
        if (i < 0 || (header && i >= header.length)) return `Column "${ref}" named in the column map is not in ${where}`;
        return i;
      };
      timeIdx = [];
      timeNames = [];
      for (const ref of map.time.columns) {
        const i = find(ref);
        if (typeof i === "string") return { ok: false, error: i };
        timeIdx.push(i);
        timeNames.push(String(ref));
      }
      if (map.platformColumn !== undefined) {
        const i = find(map.platformColumn);
        if (typeof i === "string") return { ok: false, error: i };
        platformIdx = i;
      }
      bound = [];
      for (const c of map.columns) {
        const i = find(c.column);
        if (typeof i === "string") return { ok: false, error: i };
        const r = resolveVariable(c.variable)!;
        const def = vocabulary[r.canonical];
        const u = findUnit(def.dimension, c.unit)!;
        const isBearing = def.convention !== undefined;
        bound.push({
          index: i,
          name: String(c.column),
          variable: r.canonical,
          scale: u.scale,
          offset: u.offset,
          turn: isBearing ? (r.turn180 ? 180 : 0) + (c.reference === "magnetic" ? c.declinationDeg : 0) : NaN,
        });
      }
      maxIdx = Math.max(...timeIdx, platformIdx, ...bound.map((b) => b.index));
      return { ok: true };
    },
    convert(rows, firstLine) {
      const warnings: ParseWarning[] = [];
      let n = 0;
      for (const row of rows) if (!(row.length === 1 && row[0]!.trim() === "")) n++;
      const time = new Float64Array(n);
      const line = new Float64Array(n);
      const recordBad = new Uint8Array(n);
      const platform = platformIdx >= 0 ? new Int32Array(n) : null;
      const values: Partial<Record<MeasuredVariable, Float64Array>> = {};
      const bad: Partial<Record<MeasuredVariable, Uint8Array>> = {};
      const cols = bound.map((b) => {
        const v = new Float64Array(n);
        const k = new Uint8Array(n);
        values[b.variable] = v;
        bad[b.variable] = k;
        return { b, v, k };
      });
      let j = 0;
      for (let r = 0; r < rows.length; r++) {
        const row = rows[r]!;
        if (row.length === 1 && row[0]!.trim() === "") continue;
        const ln = firstLine + r;
        line[j] = ln;
        if (row.length <= maxIdx) {
          recordBad[j] = 1;
          time[j] = NaN;
          warnings.push({ line: ln, message: `expected at least ${maxIdx + 1} fields, found ${row.length}` });
          for (const c of cols) c.v[j] = NaN;
          j++;
          continue;
        }
        const tText = timeIdx.length === 1 ? row[timeIdx[0]!]! : `${row[timeIdx[0]!]!.trim()}T${row[timeIdx[1]!]!.trim()}`;
        const t = parseTime(tText);
        time[j] = t;
        if (!Number.isFinite(t)) {
          recordBad[j] = 1;
          warnings.push({ line: ln, column: timeNames.join("+"), message: `unreadable time "${tText.trim()}"${Number.isNaN(zoneS) && fmt === "iso8601" ? " (a time needs a zone unless the column map gives one)" : ""}` });
        }
        if (platform) {
          const id = row[platformIdx]!.trim();
          let p = platformIndex.get(id);
          if (p === undefined) {
            p = platformIds.length;
            platformIds.push(id);
            platformIndex.set(id, p);
          }
          platform[j] = p;
        }
        for (let c = 0; c < cols.length; c++) {
          const { b, v, k } = cols[c]!;
          const f = row[b.index]!;
          // Parse first and look at missing codes only when needed: most fields are plain numbers.
          const x = f.length === 0 ? NaN : parseDecimal(f, comma);
          if (x !== x || x === 0 || x === Infinity || x === -Infinity) {
            const tf = f.trim();
            if (tf === "" || missing.has(tf)) {
              v[j] = NaN;
              continue;
            }
            if (x !== 0) {
              v[j] = NaN;
              k[j] = 1;
              warnings.push({ line: ln, column: b.name, message: `unreadable number "${tf}"` });
              continue;
            }
          } else if (numericMissing.length !== 0 && numericMissing.includes(x) && missing.has(f.trim())) {
            v[j] = NaN;
            continue;
          }
          const y = x * b.scale + b.offset;
          v[j] = b.turn === b.turn ? (b.turn === 0 ? y : wrap360(y + b.turn)) : y;
        }
        j++;
      }
      return { chunk: { n, time, platform, line, values, bad, recordBad }, warnings };
    },
  };
}

/**
 * Records [start, end) of a chunk as views (no copy). The engine runs fastest on chunks of a few thousand records,
 * where its columns stay in the processor cache, so streaming callers cut large parsed pieces with this. O(columns).
 */
export function sliceChunk(c: RecordChunk, start: number, end: number): RecordChunk {
  const values: RecordChunk["values"] = {};
  const bad: RecordChunk["bad"] = {};
  for (const [k, v] of Object.entries(c.values)) values[k as MeasuredVariable] = v!.subarray(start, end);
  for (const [k, v] of Object.entries(c.bad)) bad[k as MeasuredVariable] = v!.subarray(start, end);
  return {
    n: end - start,
    time: c.time.subarray(start, end),
    platform: c.platform ? c.platform.subarray(start, end) : null,
    line: c.line.subarray(start, end),
    values,
    bad,
    recordBad: c.recordBad.subarray(start, end),
  };
}

/** Suggested number of records per engine push (see `sliceChunk`). */
export const ENGINE_SLICE = 8192;
