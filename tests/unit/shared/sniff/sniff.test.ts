import { describe, expect, test } from "vitest";
import { mooringCsv, demoMooringDefaults } from "../../../../shared/demo/generate";
import { checkColumnMap, createScanner, detectEncoding, sniffDialect, splitLine, suggestColumnMap, parseHeader, previewRows } from "../../../../shared/sniff";

const bytes = (s: string) => new TextEncoder().encode(s);
const scan = (text: string, pieces = 1) => {
  const s = sniffDialect(text);
  const sc = createScanner(s.dialect, s.header);
  const step = Math.ceil(text.length / pieces);
  for (let i = 0; i < text.length; i += step) sc.push(text.slice(i, i + step));
  return { sniff: s, result: sc.finish() };
};

describe("detectEncoding", () => {
  test("reads UTF-8 with and without a byte-order mark", () => {
    expect(detectEncoding(bytes("time,wspd\n"), true)).toMatchObject({ ok: true, encoding: "utf-8" });
    expect(detectEncoding(new Uint8Array([0xef, 0xbb, 0xbf, ...bytes("time,°C\n")]), true)).toMatchObject({ ok: true, encoding: "utf-8-bom", bomBytes: 3 });
  });
  test("refuses an empty file, UTF-16 with its byte order named, and binary bytes with the line", () => {
    expect(detectEncoding(new Uint8Array(0), true)).toMatchObject({ ok: false, code: "empty" });
    const le = detectEncoding(new Uint8Array([0xff, 0xfe, 0x74, 0, 0x69, 0]), true);
    expect(le).toMatchObject({ ok: false, code: "utf16" });
    expect((le as { message: string }).message).toContain("little-endian");
    const bin = detectEncoding(new Uint8Array([...bytes("a,b\n1,2\n"), 0, 1, 2]), true);
    expect(bin).toMatchObject({ ok: false, code: "binary", line: 3 });
  });
  test("names the line of a Latin-1 byte and accepts a multi-byte character cut at the end of a head", () => {
    const latin = detectEncoding(new Uint8Array([...bytes("time,temp\n2026-01-01T00:00Z,"), 0xb0, 0x43, 0x0a]), true);
    expect(latin).toMatchObject({ ok: false, code: "invalid_utf8", line: 2 });
    const cut = bytes("x,°").subarray(0, 3); // "x," + first byte of "°" (0xC2 0xB0)
    expect(detectEncoding(cut, false)).toMatchObject({ ok: true });
    expect(detectEncoding(cut, true)).toMatchObject({ ok: false, code: "invalid_utf8" });
  });
});

describe("sniffDialect", () => {
  test("finds comma, header and LF in the demo mooring CSV", () => {
    const text = [...mooringCsv({ ...demoMooringDefaults, durationS: 600, intervalS: 10 })].join("");
    const s = sniffDialect(text);
    expect(s.dialect).toEqual({ delimiter: ",", decimalMark: ".", headerRow: 1, skipRows: 0, lineEnding: "lf" });
    expect(s.header?.[0]).toBe("time");
    expect(s.columnCount).toBe(10);
  });
  test("finds semicolon with a decimal comma, a preamble, a units line and CRLF", () => {
    const text = "# logger M-7 export\r\nTime;WSPD;WDIR;ATMP\r\nUTC;m/s;deg;degC\r\n2026-01-01 00:00:00;5,2;180;12,5\r\n2026-01-01 00:10:00;5,4;182;12,4\r\n";
    const s = sniffDialect(text);
    expect(s.dialect).toEqual({ delimiter: ";", decimalMark: ",", headerRow: 2, skipRows: 1, lineEnding: "crlf" });
    expect(s.header).toEqual(["Time", "WSPD", "WDIR", "ATMP"]);
  });
  test("finds tab and runs of whitespace, and a file without a header", () => {
    expect(sniffDialect("time\twspd\n2026-01-01T00:00Z\t3.1\n2026-01-01T00:01Z\t3.2\n").dialect.delimiter).toBe("\t");
    const ws = sniffDialect("2026-01-01T00:00Z   3.1   180\n2026-01-01T00:01Z  3.25  181\n");
    expect(ws.dialect).toMatchObject({ delimiter: " ", headerRow: 0 });
    expect(splitLine("  a   b\tc ", " ")).toEqual(["a", "b", "c"]);
    expect(splitLine('x,"a,b","say ""hi"""', ",")).toEqual(["x", "a,b", 'say "hi"']);
  });
  test("previews the first rows with their line numbers", () => {
    const p = previewRows("h1,h2\n1,2\n\n3,4\n", { delimiter: ",", decimalMark: ".", headerRow: 1, skipRows: 0, lineEnding: "lf" }, 50);
    expect(p).toEqual({ header: ["h1", "h2"], rows: [["1", "2"], ["3", "4"]], firstLine: 2, lines: [2, 4] });
  });
});

describe("createScanner", () => {
  const head = "time,wspd,wdir\n";
  test("a clean file is ok, whatever the piece size", () => {
    const text = head + "2026-01-01T00:00:00Z,3.1,180\n2026-01-01T00:00:01Z,3.2,181\n";
    for (const pieces of [1, 3, 17]) expect(scan(text, pieces).result).toEqual({ status: "ok", dataLineCount: 2, findings: [] });
  });
  test("a header-only file is unusable and says so", () => {
    const r = scan(head).result;
    expect(r.status).toBe("unusable");
    expect(r.findings[0]!.message).toBe("The file has a header (line 1) but no data lines after it.");
  });
  test("a 5 MB single line is refused with its length", () => {
    const sc = createScanner({ delimiter: ",", decimalMark: ".", headerRow: 1, skipRows: 0, lineEnding: "lf" }, null);
    const chunk = "1,".repeat(1 << 19);
    for (let i = 0; i < 5; i++) sc.push(chunk);
    const r = sc.finish();
    expect(r.status).toBe("unusable");
    expect(r.findings[0]).toMatchObject({ code: "line_too_long", lines: [1] });
    expect(r.findings[0]!.message).toContain("5,242,880");
  });
  test("ragged rows, NaN and Infinity text, thousands separators and formulas are counted with lines and columns", () => {
    const text =
      head +
      "2026-01-01T00:00:00Z,3.1,180\n" +
      "2026-01-01T00:00:01Z,NaN,181\n" +
      "2026-01-01T00:00:02Z,Infinity,182\n" +
      '2026-01-01T00:00:03Z,"1,234.5",183\n' +
      "2026-01-01T00:00:04Z,=SUM(A1:A9),184\n" +
      "2026-01-01T00:00:05Z,3.3\n" +
      "2026-01-01T00:00:06Z,3.3,185\n";
    const r = scan(text).result;
    expect(r.status).toBe("warnings");
    const by = Object.fromEntries(r.findings.map((f) => [f.code, f]));
    expect(by.ragged_rows).toMatchObject({ count: 1, lines: [7] });
    expect(by.nan_text).toMatchObject({ count: 1, lines: [3], column: '"wspd"' });
    expect(by.infinity_text).toMatchObject({ count: 1, lines: [4] });
    expect(by.thousands_separator).toMatchObject({ count: 1, lines: [5] });
    expect(by.formula_like).toMatchObject({ count: 1, lines: [6] });
  });
  test("unreadable and mixed-zone times are reported per line", () => {
    const text = head + "2026-01-01T00:00:00Z,3,1\n2026-01-01T01:00:00+02:00,3,1\n2026-02-30T00:00:00Z,3,1\n2026-01-01T03:00:00,3,1\n";
    const r = scan(text).result;
    const by = Object.fromEntries(r.findings.map((f) => [f.code, f]));
    expect(by.time_unreadable).toMatchObject({ count: 1, lines: [4] });
    expect(by.time_mixed_zones!.message).toContain("without a zone");
    expect(by.time_mixed_zones!.message).toContain("+02:00");
  });
  test("a NUL byte deep in the file makes it unusable", () => {
    const r = scan(head + "2026-01-01T00:00:00Z,3,1\n2026-01-01T00:00:01Z,3\u0000,1\n").result;
    expect(r.findings.find((f) => f.code === "nul_byte")).toMatchObject({ lines: [3] });
    expect(r.status).toBe("unusable");
  });
});

describe("suggestColumnMap and checkColumnMap", () => {
  test("suggests a valid map for the demo mooring from its header and value ranges", () => {
    const text = [...mooringCsv({ ...demoMooringDefaults, durationS: 600, intervalS: 10 })].join("");
    const s = sniffDialect(text);
    const p = previewRows(text, s.dialect);
    const sug = suggestColumnMap(s.header, p.rows, s.dialect, null);
    const byCol = Object.fromEntries((sug.map.columns as { column: string; unit: string; variable: string }[]).map((c) => [c.column, `${c.variable} ${c.unit}`]));
    // Units of the demo file are documented beside its generator (shared/demo/generate.ts).
    expect(byCol).toMatchObject({ wspd: "wind_speed m s-1", wdir: "wind_from_direction degree", airt: "air_temperature degC", baro: "air_pressure hPa", rh: "relative_humidity percent", sst: "sea_surface_temperature degC", cur_e: "eastward_sea_water_velocity cm s-1" });
    expect(checkColumnMap(sug.map, s.header).ok).toBe(true);
  });
  test("reads units written in headers", () => {
    expect(parseHeader("WSPD (kn)")).toEqual({ name: "WSPD", unit: "kn" });
    expect(parseHeader("air_temp[degF]")).toEqual({ name: "air_temp", unit: "degF" });
    const sug = suggestColumnMap(["Time", "WSPD (kn)", "WDIR (deg)"], [["2026-01-01T00:00Z", "10", "90"]], { delimiter: ",", decimalMark: ".", headerRow: 1, skipRows: 0, lineEnding: "lf" });
    expect(sug.map.columns[0]).toMatchObject({ variable: "wind_speed", unit: "knot" });
  });
  test("reuses the platform's last map when the header fits", () => {
    const prev = checkColumnMap({ time: { columns: ["t"], zone: "UTC" }, columns: [{ column: "w", variable: "eastward_wind", unit: "m s-1" }, { column: "v", variable: "northward_wind", unit: "m s-1" }] });
    expect(prev.ok).toBe(true);
    const sug = suggestColumnMap(["t", "w", "v"], [], { delimiter: ";", decimalMark: ",", headerRow: 1, skipRows: 0, lineEnding: "lf" }, prev.ok ? prev.map : null);
    expect(sug.source).toBe("platform");
    expect(sug.map.delimiter).toBe(";");
  });
  test("explains a missing time column, half a wind pair and a unit that does not fit", () => {
    const r = checkColumnMap({ time: { columns: [] }, columns: [{ column: "w", variable: "wind_speed", unit: "m s-1" }] });
    expect(r.ok).toBe(false);
    expect(r.problems.map((p) => p.message)).toContain("A time column is required: choose the column that holds the time of each record.");
    const wind = checkColumnMap({ time: { columns: ["t"] }, columns: [{ column: "w", variable: "wind_speed", unit: "m s-1" }] });
    expect(wind.problems[0]!.message).toMatch(/^Wind needs both speed and direction/);
    const unit = checkColumnMap({ time: { columns: ["t"] }, columns: [{ column: "p", variable: "air_pressure", unit: "degC" }] });
    expect(unit.problems[0]).toMatchObject({ path: "columns.0.unit" });
    expect(unit.problems[0]!.message).toContain('Unit "degC" is not allowed for air_pressure');
  });
});

describe("a first data line with bad values is still data", () => {
  // Found by the hostile-input suite: an "ERR" or formula cell in the first data lines made that line the header.
  test("an ERR cell in the first data line leaves the real header in place", () => {
    const r = sniffDialect("time,wspd,wdir\n2026-10-01T00:00:00Z,ERR,180\n2026-10-01T00:10:00Z,=1+2,181\n2026-10-01T00:20:00Z,3,182\n");
    expect(r.header).toEqual(["time", "wspd", "wdir"]);
    expect(r.dialect.headerRow).toBe(1);
    expect(r.firstDataLine).toBe(2);
  });
});
