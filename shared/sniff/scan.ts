import { parseIsoTime } from "../compute/canonical";
import { splitLine, type Dialect } from "./dialect";

/**
 * A whole-file scan for problems a data manager should hear about before processing: lines too long to be
 * records, NUL bytes, ragged rows, text where numbers belong (NaN/Infinity strings, thousands separators,
 * formula-like cells), unreadable or mixed-zone times. Fed decoded text in pieces of any size; memory stays
 * bounded (counts plus the first few line numbers per problem). Pure: used by the server and the browser worker.
 */

export interface Finding {
  severity: "error" | "warning";
  code: string;
  message: string;
  count: number;
  /** The first few 1-based line numbers where it happens. */
  lines: number[];
  column?: string;
}

export interface ScanResult {
  status: "ok" | "warnings" | "unusable";
  dataLineCount: number;
  findings: Finding[];
}

export interface ScanOptions {
  /** Longest line accepted as a record, in characters (default 1 MiB). */
  maxLineChars?: number;
  /** Time column positions (0-based); guessed from the header when omitted. */
  timeColumns?: number[];
  missingValues?: string[];
}

const KEEP_LINES = 5;
const DEFAULT_MAX_LINE = 1 << 20;

class Tally {
  count = 0;
  lines: number[] = [];
  example = "";
  add(line: number, example = "") {
    this.count++;
    if (this.lines.length < KEEP_LINES) this.lines.push(line);
    if (!this.example) this.example = example;
  }
}

const NUM_POINT = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const NUM_COMMA = /^[+-]?(\d+,?\d*|,\d+)([eE][+-]?\d+)?$/;
const NAN_TEXT = /^[+-]?nan$/i;
const INF_TEXT = /^[+-]?(inf|infinity)$/i;
const THOUSANDS_POINT = /^[+-]?\d{1,3}(,\d{3})+(\.\d+)?$/;
const THOUSANDS_COMMA = /^[+-]?\d{1,3}(\.\d{3})+(,\d+)?$/;
const FORMULA = /^[=+\-@]/;
const ISO_START = /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}/;
const ZONE = /(Z|[+-]\d{2}:?\d{2})$/;

/** Column positions whose header says time or date; else column 0 when its first value reads as a time. */
export function guessTimeColumns(header: string[] | null): number[] {
  if (!header) return [0];
  const idx = header.map((h, i) => (/(^|[^a-z])(time|date|datetime|timestamp|utc)([^a-z]|$)/i.test(h) ? i : -1)).filter((i) => i >= 0);
  return idx.length ? idx.slice(0, 2) : [0];
}

const fmt = (n: number) => n.toLocaleString("en-GB");
const at = (t: Tally) => (t.lines.length ? ` (line${t.lines.length > 1 ? "s" : ""} ${t.lines.join(", ")}${t.count > t.lines.length ? ", …" : ""})` : "");

export interface Scanner {
  push(text: string): void;
  finish(): ScanResult;
}

/** Creates a scanner for a file read with `dialect`; `header` names columns in messages. */
export function createScanner(dialect: Dialect, header: string[] | null, opts: ScanOptions = {}): Scanner {
  const maxLine = opts.maxLineChars ?? DEFAULT_MAX_LINE;
  const missing = new Set((opts.missingValues ?? ["", "NA", "-999", "-9999"]).map((m) => m.trim()));
  const timeCols = opts.timeColumns ?? guessTimeColumns(header);
  const comma = dialect.decimalMark === ",";
  const firstData = dialect.headerRow + dialect.skipRows + 1;
  let width = header?.length ?? 0;
  const name = (i: number) => (header?.[i] ? `"${header[i]}"` : `${i + 1}`);

  let carry = "";
  let overlong = false;
  let overlongLen = 0;
  let lineNo = 0;
  let dataLines = 0;
  let pendingCR = false;
  const longLines = new Tally();
  const nul = new Tally();
  const notUtf8 = new Tally();
  const ragged = new Tally();
  const timeBad = new Tally();
  const zones = new Map<string, Tally>();
  const perCol = new Map<number, { nan: Tally; inf: Tally; thousands: Tally; formula: Tally; text: Tally; numbers: number }>();
  const col = (i: number) => {
    let c = perCol.get(i);
    if (!c) perCol.set(i, (c = { nan: new Tally(), inf: new Tally(), thousands: new Tally(), formula: new Tally(), text: new Tally(), numbers: 0 }));
    return c;
  };

  const onLine = (line: string) => {
    lineNo++;
    if (lineNo === 1 && line.charCodeAt(0) === 0xfeff) line = line.slice(1);
    if (line.indexOf("\0") >= 0) {
      nul.add(lineNo);
      return;
    }
    // The decoder turns bytes that are not UTF-8 into U+FFFD.
    if (line.indexOf("\uFFFD") >= 0) notUtf8.add(lineNo);
    if (lineNo < firstData || line.trim() === "") return;
    dataLines++;
    const fields = splitLine(line, dialect.delimiter);
    if (!width) width = fields.length;
    if (fields.length !== width) ragged.add(lineNo, `${fields.length}`);
    for (let i = 0; i < fields.length; i++) {
      const t = fields[i]!.trim();
      if (timeCols.includes(i)) {
        if (timeCols.length === 1 && ISO_START.test(t)) {
          const z = ZONE.exec(t);
          const zone = z ? (z[1] === "Z" ? "Z" : z[1]!.replace(/^([+-]\d{2})(\d{2})$/, "$1:$2")) : "none";
          let tally = zones.get(zone);
          if (!tally) zones.set(zone, (tally = new Tally()));
          tally.add(lineNo);
          if (!Number.isFinite(parseIsoTime(t, 0))) timeBad.add(lineNo, t);
        } else if (t === "" || (!/\d/.test(t))) timeBad.add(lineNo, t);
        continue;
      }
      if (missing.has(t)) continue;
      const c = col(i);
      // Fast path for the common case (a plain finite number); the regexes below only see the rest.
      const c0 = t.charCodeAt(0);
      if ((c0 >= 48 && c0 <= 57) || c0 === 45 || c0 === 46 || c0 === 43) {
        const x = comma ? (t.indexOf(".") < 0 ? Number(t.replace(",", ".")) : NaN) : t.indexOf(",") < 0 ? Number(t) : NaN;
        if (Number.isFinite(x)) {
          c.numbers++;
          continue;
        }
      }
      if ((comma ? NUM_COMMA : NUM_POINT).test(t)) {
        c.numbers++;
        continue;
      }
      if (NAN_TEXT.test(t)) c.nan.add(lineNo, t);
      else if (INF_TEXT.test(t)) c.inf.add(lineNo, t);
      else if ((comma ? THOUSANDS_COMMA : THOUSANDS_POINT).test(t)) c.thousands.add(lineNo, t);
      else if (FORMULA.test(t)) c.formula.add(lineNo, t.slice(0, 40));
      else c.text.add(lineNo, t.slice(0, 40));
    }
  };

  return {
    push(text) {
      let start = 0;
      if (pendingCR && text.charCodeAt(0) === 10) start = 1;
      pendingCR = false;
      for (;;) {
        let i = start;
        const n = text.length;
        // Find the next line break (LF, CR or CRLF).
        while (i < n) {
          const c = text.charCodeAt(i);
          if (c === 10 || c === 13) break;
          i++;
        }
        if (i >= n) {
          const rest = text.length - start;
          if (overlong) overlongLen += rest;
          else if (carry.length + rest > maxLine) {
            overlong = true;
            overlongLen = carry.length + rest;
            carry = "";
          } else carry += text.slice(start);
          return;
        }
        if (overlong) {
          overlongLen += i - start;
          lineNo++;
          longLines.add(lineNo, String(overlongLen));
          overlong = false;
          overlongLen = 0;
        } else {
          const piece = carry + text.slice(start, i);
          carry = "";
          if (piece.length > maxLine) {
            lineNo++;
            longLines.add(lineNo, String(piece.length));
          } else onLine(piece);
        }
        if (text.charCodeAt(i) === 13) {
          if (i + 1 >= n) {
            pendingCR = true;
            return;
          }
          if (text.charCodeAt(i + 1) === 10) i++;
        }
        start = i + 1;
      }
    },
    finish() {
      if (overlong) {
        lineNo++;
        longLines.add(lineNo, String(overlongLen));
      } else if (carry.length) onLine(carry);
      carry = "";
      const f: Finding[] = [];
      if (longLines.count) {
        f.push({
          severity: "error",
          code: "line_too_long",
          count: longLines.count,
          lines: longLines.lines,
          message: `${fmt(longLines.count)} line${longLines.count > 1 ? "s are" : " is"} longer than ${fmt(maxLine)} characters${at(longLines)}; line ${longLines.lines[0]} has ${fmt(Number(longLines.example))}. A logger record is one short line: check that the file has line breaks.`,
        });
      }
      if (nul.count) f.push({ severity: "error", code: "nul_byte", count: nul.count, lines: nul.lines, message: `${fmt(nul.count)} line${nul.count > 1 ? "s hold" : " holds"} NUL bytes${at(nul)}: binary data inside a text file. Export the data again as CSV or text.` });
      if (notUtf8.count) f.push({ severity: "error", code: "not_utf8", count: notUtf8.count, lines: notUtf8.lines, message: `${fmt(notUtf8.count)} line${notUtf8.count > 1 ? "s hold" : " holds"} bytes that are not UTF-8${at(notUtf8)}. Save or export the file as UTF-8 text and upload it again.` });
      if (dataLines === 0 && !longLines.count) {
        f.push({ severity: "error", code: "no_data", count: 0, lines: [], message: dialect.headerRow > 0 ? `The file has a header (line ${dialect.headerRow}) but no data lines after it.` : "The file has no data lines." });
      }
      if (ragged.count) {
        const severity = ragged.count * 2 > dataLines ? "error" : "warning";
        f.push({
          severity,
          code: "ragged_rows",
          count: ragged.count,
          lines: ragged.lines,
          message: `${fmt(ragged.count)} of ${fmt(dataLines)} data lines do not have ${width} fields${at(ragged)}; line ${ragged.lines[0]} has ${ragged.example}. ${severity === "error" ? "Check the delimiter." : "Those records will be flagged as syntax failures."}`,
        });
      }
      const timeName = timeCols.map(name).join(" + ");
      if (timeBad.count) {
        const all = timeBad.count === dataLines;
        f.push({
          severity: all ? "error" : "warning",
          code: "time_unreadable",
          count: timeBad.count,
          lines: timeBad.lines,
          column: timeName,
          message: `Column ${timeName}: ${fmt(timeBad.count)} time${timeBad.count > 1 ? "s" : ""} cannot be read${at(timeBad)}, e.g. "${timeBad.example}".${all ? " Check the time column and its format in the column map." : " Those records will fail the syntax test."}`,
        });
      }
      if (zones.size > 1) {
        const parts = [...zones.entries()].sort((a, b) => b[1].count - a[1].count).map(([z, t]) => `${fmt(t.count)} ${z === "none" ? "without a zone" : z === "Z" ? "in UTC (Z)" : `at ${z}`} (first on line ${t.lines[0]})`);
        const lines = [...zones.values()].flatMap((t) => t.lines).sort((a, b) => a - b).slice(0, KEEP_LINES);
        f.push({
          severity: "warning",
          code: "time_mixed_zones",
          count: [...zones.values()].reduce((s, t) => s + t.count, 0),
          lines,
          column: timeName,
          message: `Column ${timeName} mixes time zones: ${parts.join(", ")}. Times with a zone are converted to UTC; times without one need a zone in the column map.`,
        });
      }
      for (const [i, c] of [...perCol.entries()].sort((a, b) => a[0] - b[0])) {
        const column = name(i);
        const add = (t: Tally, code: string, text: string) => {
          if (t.count) f.push({ severity: "warning", code, count: t.count, lines: t.lines, column, message: `Column ${column}: ${fmt(t.count)} ${text}${at(t)}` });
        };
        add(c.nan, "nan_text", `value${c.nan.count > 1 ? "s" : ""} written as "${c.nan.example}". They are read as missing unless the column map says otherwise.`);
        add(c.inf, "infinity_text", `value${c.inf.count > 1 ? "s" : ""} written as "${c.inf.example}" (not a finite number). They will fail the syntax test.`);
        add(c.thousands, "thousands_separator", `number${c.thousands.count > 1 ? "s" : ""} with a thousands separator, e.g. "${c.thousands.example}". Export without separators; as written they cannot be read.`);
        add(c.formula, "formula_like", `cell${c.formula.count > 1 ? "s" : ""} that look like spreadsheet formulas, e.g. "${c.formula.example}". Tauline never evaluates them; they are unreadable as numbers and will be neutralised on export.`);
        if (c.text.count && c.numbers >= c.text.count) add(c.text, "not_a_number", `value${c.text.count > 1 ? "s" : ""} that are not numbers, e.g. "${c.text.example}". They will fail the syntax test.`);
      }
      const status = f.some((x) => x.severity === "error") ? "unusable" : f.length ? "warnings" : "ok";
      return { status, dataLineCount: dataLines, findings: f };
    },
  };
}
