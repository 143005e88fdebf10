import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, test } from "vitest";
import { columnMapSchema } from "../../../../shared/schemas/column-map";
import Papa from "papaparse";
import { openCanonicalStream, parseDelimited } from "../../../../server/pipeline/read-csv";

const map = (delimiter: string) =>
  columnMapSchema.parse({
    version: 1,
    delimiter,
    headerRow: 1,
    time: { columns: ["time"], format: "iso8601", zone: null },
    columns: [
      { column: "wspd", variable: "wind_speed", unit: "knot" },
      { column: "wdir", variable: "wind_from_direction", unit: "degree", convention: "from" },
    ],
  });

async function read(text: string, delimiter: string) {
  const dir = mkdtempSync(path.join(tmpdir(), "tauline-read-"));
  const file = path.join(dir, "logger.txt");
  writeFileSync(file, text);
  const s = await openCanonicalStream(file, map(delimiter));
  const speeds: number[] = [];
  const times: number[] = [];
  for await (const { chunk } of s.chunks) {
    for (let i = 0; i < chunk.n; i++) {
      times.push(chunk.time[i]!);
      speeds.push(chunk.values.wind_speed![i]!);
    }
  }
  return { times, speeds };
}

describe("openCanonicalStream", () => {
  test("reads a whitespace-aligned logger file the way the upload sniffer splits it (runs of blanks and tabs)", async () => {
    const text = "time      wspd   wdir\n2026-09-01T00:00:00Z   20.0  \t 225\n  2026-09-01T00:01:00Z 10.0 180\n";
    const { times, speeds } = await read(text, " ");
    expect(times).toEqual([Date.UTC(2026, 8, 1) / 1000, Date.UTC(2026, 8, 1, 0, 1) / 1000]);
    // 1 kn = 1852/3600 m/s (definition of the knot): 20 kn = 10.2889 m/s
    expect(speeds[0]).toBeCloseTo(10.2889, 4);
    expect(speeds[1]).toBeCloseTo(5.1444, 4);
  });

  test("reads the same records from a comma-separated file", async () => {
    const { speeds } = await read("time,wspd,wdir\r\n2026-09-01T00:00:00Z,20.0,225\r\n", ",");
    expect(speeds.map((v) => Number(v.toFixed(4)))).toEqual([10.2889]);
  });
});

// Reference: papaparse's documented `Papa.parse` on the same text (the library's own public entry point). The
// pipeline calls the library's core parser directly; for every line ending and quoting case the rows must match.
describe("parseDelimited reads as Papa.parse does", () => {
  const cases: [string, string, string][] = [
    ["LF", "time,wspd\n2026-10-01T00:00:00Z,5.1\n2026-10-01T00:00:01Z,5.2\n", ","],
    ["CRLF", "time,wspd\r\n2026-10-01T00:00:00Z,5.1\r\n2026-10-01T00:00:01Z,5.2\r\n", ","],
    ["CR only", "time;wspd\r2026-10-01T00:00:00Z;5,1\r", ";"],
    ["quoted delimiter and doubled quote", 'time,note\n2026-10-01T00:00:00Z,"a, ""b"""\n', ","],
    ["empty fields and an empty line", "a\tb\n\t\n\n1\t2\n", "\t"],
    ["no line ending at the end", "a,b\n1,2", ","],
  ];
  for (const [name, text, delimiter] of cases)
    test(name, () => {
      expect(parseDelimited(text, delimiter)).toEqual(Papa.parse<string[]>(text, { delimiter }).data);
    });
});
