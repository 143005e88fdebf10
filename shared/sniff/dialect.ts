import { z } from "zod";

/**
 * Dialect sniffing for delimited logger exports: delimiter, decimal mark, header row, units line, line ending.
 * Pure and cheap (looks at the first lines only); the server's answer is the authority, the browser runs the
 * same code for its early preview.
 */

/** " " stands for runs of spaces or tabs (fixed-width and whitespace-separated exports). */
export const delimiters = [",", ";", "\t", " "] as const;
export type Delimiter = (typeof delimiters)[number];
export const delimiterLabels: Record<Delimiter, string> = { ",": "comma", ";": "semicolon", "\t": "tab", " ": "spaces (runs of whitespace)" };

export const dialectSchema = z.object({
  delimiter: z.enum(delimiters, { message: "Choose comma, semicolon, tab or spaces" }),
  decimalMark: z.enum([".", ","], { message: "The decimal mark is a point or a comma" }),
  /** 1-based line of the header; 0 when the file has none. */
  headerRow: z.number().int().min(0, "The header row is 0 (none) or a line number").max(50, "The header must be within the first 50 lines"),
  /** Lines between the header and the data (e.g. a units line). */
  skipRows: z.number().int().min(0).max(50),
  lineEnding: z.enum(["lf", "crlf", "cr"]),
});
export type Dialect = z.infer<typeof dialectSchema>;

/** Splits one line into fields. Quotes ("…", with "" for a quote) are honoured for real delimiters. O(length). */
export function splitLine(line: string, delimiter: Delimiter): string[] {
  if (delimiter === " ") {
    const t = line.trim();
    return t === "" ? [""] : t.split(/[ \t]+/);
  }
  if (line.indexOf('"') < 0) return line.split(delimiter);
  const out: string[] = [];
  let field = "";
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const c = line[i]!;
    if (quoted) {
      if (c === '"') {
        if (line[i + 1] === '"') {
          field += '"';
          i++;
        } else quoted = false;
      } else field += c;
    } else if (c === '"' && field.trim() === "") {
      quoted = true;
      field = "";
    } else if (c === delimiter) {
      out.push(field);
      field = "";
    } else field += c;
  }
  out.push(field);
  return out;
}

/** Line ending of the text: the first line break decides. */
export function detectLineEnding(text: string): Dialect["lineEnding"] {
  const n = text.indexOf("\n");
  const r = text.indexOf("\r");
  if (r >= 0 && (n < 0 || r < n)) return text[r + 1] === "\n" ? "crlf" : "cr";
  return "lf";
}

/** Splits text into lines on LF, CRLF or CR. A last line without a break is kept. */
export function splitLines(text: string): string[] {
  const lines = text.split(/\r\n|\n|\r/);
  if (lines.length && lines[lines.length - 1] === "") lines.pop();
  return lines;
}

const NUMBER_POINT = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const NUMBER_COMMA = /^[+-]?\d+,\d+$/;
const TIME_LIKE = /^\d{4}-\d{2}-\d{2}([T ]\d{2}:\d{2}(:\d{2}(\.\d+)?)?)?(Z|[+-]\d{2}:?\d{2})?$|^\d{1,2}[/.]\d{1,2}[/.]\d{4}|^\d{2}:\d{2}(:\d{2})?$/;

/** True for a field that reads as data (a number, a time or a date), not as a label. */
export function isDataLike(field: string, decimalMark: "." | "," = "."): boolean {
  const t = field.trim().replace(/^"|"$/g, "");
  if (t === "") return true;
  if (NUMBER_POINT.test(t) || TIME_LIKE.test(t)) return true;
  if (decimalMark === "," && NUMBER_COMMA.test(t)) return true;
  return /^[+-]?(nan|inf|infinity|na|n\/a)$/i.test(t);
}

function modeOf(values: number[]): { value: number; share: number } {
  const counts = new Map<number, number>();
  for (const v of values) counts.set(v, (counts.get(v) ?? 0) + 1);
  let best = 0;
  let bestN = 0;
  for (const [v, n] of counts) if (n > bestN || (n === bestN && v > best)) (best = v), (bestN = n);
  return { value: best, share: values.length ? bestN / values.length : 0 };
}

export interface SniffResult {
  dialect: Dialect;
  /** Fields per data line (the most common count). */
  columnCount: number;
  /** Header names (null when the file has none). */
  header: string[] | null;
  /** 1-based line of the first data line. */
  firstDataLine: number;
}

/**
 * Guesses the dialect from the first lines of a file (pass ~100 lines; the last may be cut off, so it is ignored
 * when `complete` is false). The delimiter is the candidate giving the most lines with the same field count (>1);
 * the header is the last all-label line before the data; a further all-label line of the same width is a units line.
 */
export function sniffDialect(text: string, complete = true): SniffResult {
  const lineEnding = detectLineEnding(text);
  let lines = splitLines(text);
  if (!complete && lines.length > 1) lines = lines.slice(0, -1);
  lines = lines.slice(0, 200);
  const sample = lines.filter((l) => l.trim() !== "");
  let delimiter: Delimiter = ",";
  let bestScore = -1;
  let columnCount = 1;
  for (const d of delimiters) {
    const counts = sample.map((l) => splitLine(l, d).length);
    const { value, share } = modeOf(counts);
    if (value < 2) continue;
    // Consistency first; among equally consistent candidates prefer real delimiters over whitespace.
    const score = share * 1000 + Math.min(value, 50) + (d === " " ? -5 : 0);
    if (score > bestScore) (bestScore = score), (delimiter = d), (columnCount = value);
  }

  // Decimal mark: a comma decimal is only possible when the comma is not the delimiter.
  let decimalMark: "." | "," = ".";
  if (delimiter !== ",") {
    let commaNums = 0;
    let pointNums = 0;
    for (const l of sample.slice(0, 100)) {
      for (const f of splitLine(l, delimiter)) {
        const t = f.trim();
        if (NUMBER_COMMA.test(t)) commaNums++;
        else if (/^[+-]?\d+\.\d+$/.test(t)) pointNums++;
      }
    }
    if (commaNums > pointNums) decimalMark = ",";
  }

  // Header: the last line before the first data line whose fields all look like labels.
  let headerRow = 0;
  let skipRows = 0;
  let firstDataLine = 1;
  let firstData = -1;
  for (let i = 0; i < lines.length; i++) {
    const fields = splitLine(lines[i]!, delimiter);
    if (lines[i]!.trim() === "" || fields.length !== columnCount) continue;
    const dataLike = fields.filter((f) => isDataLike(f, decimalMark)).length;
    // A line holding a time is a data line even when some of its values are bad (a logger's "ERR" after power-up,
    // a formula cell): taking it for the header would hide the lines above it and name columns after values.
    if (dataLike === fields.length || fields.some((f) => TIME_LIKE.test(f.trim().replace(/^"|"$/g, "")))) {
      firstData = i;
      break;
    }
  }
  if (firstData < 0) firstData = lines.length;
  const labelLines: number[] = [];
  for (let i = 0; i < firstData; i++) {
    const fields = splitLine(lines[i]!, delimiter);
    if (fields.length === columnCount && fields.some((f) => !isDataLike(f, decimalMark))) labelLines.push(i);
  }
  if (labelLines.length >= 2 && labelLines[labelLines.length - 1] === firstData - 1 && labelLines[labelLines.length - 2] === firstData - 2 && looksLikeUnits(lines[firstData - 1]!, delimiter)) {
    headerRow = firstData - 1;
    skipRows = 1;
  } else if (labelLines.length) {
    headerRow = labelLines[labelLines.length - 1]! + 1;
    skipRows = Math.max(0, firstData - headerRow);
  }
  firstDataLine = firstData + 1;
  const header = headerRow > 0 ? splitLine(lines[headerRow - 1]!, delimiter).map((h) => h.trim()) : null;
  return { dialect: { delimiter, decimalMark, headerRow, skipRows, lineEnding }, columnCount, header, firstDataLine };
}

function looksLikeUnits(line: string, delimiter: Delimiter): boolean {
  const fields = splitLine(line, delimiter).map((f) => f.trim().replace(/^[([]|[)\]]$/g, ""));
  const unitish = /^(m\/s|m s-1|cm\/s|cm s-1|mm\/s|kn|kt|knots?|km\/h|deg|degrees?|°|degc|°c|c|k|f|°f|hpa|mbar|mb|pa|kpa|%|percent|psu|1|m|cm|utc|iso ?8601|-|)$/i;
  return fields.filter((f) => unitish.test(f)).length >= Math.ceil(fields.length / 2);
}

export interface PreviewTable {
  header: string[] | null;
  /** Data rows (at most `limit`), fields as text. */
  rows: string[][];
  /** 1-based file line of rows[0]. */
  firstLine: number;
  /** Line number of each row. */
  lines: number[];
}

/** The first `limit` data rows of `text` read with `dialect`. Blank lines are skipped. O(size of text). */
export function previewRows(text: string, dialect: Dialect, limit = 50, complete = true): PreviewTable {
  let lines = splitLines(text.charCodeAt(0) === 0xfeff ? text.slice(1) : text);
  if (!complete && lines.length > 1) lines = lines.slice(0, -1);
  const header = dialect.headerRow > 0 && lines.length >= dialect.headerRow ? splitLine(lines[dialect.headerRow - 1]!, dialect.delimiter).map((h) => h.trim()) : null;
  const start = dialect.headerRow + dialect.skipRows;
  const rows: string[][] = [];
  const lineNos: number[] = [];
  for (let i = start; i < lines.length && rows.length < limit; i++) {
    if (lines[i]!.trim() === "") continue;
    rows.push(splitLine(lines[i]!, dialect.delimiter));
    lineNos.push(i + 1);
  }
  return { header, rows, firstLine: lineNos[0] ?? start + 1, lines: lineNos };
}
