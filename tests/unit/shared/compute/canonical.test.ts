import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { columnMapSchema, type ColumnMapInput } from "../../../../shared/schemas/column-map";
import { compileTimePattern, createCanonicalizer, daysFromCivil, parseDecimal, parseIsoTime } from "../../../../shared/compute/canonical";

const map = (m: Partial<ColumnMapInput> & Pick<ColumnMapInput, "columns">) => columnMapSchema.parse({ time: { columns: ["time"] }, ...m });

describe("time parsing (ISO 8601, CF seconds since 1970-01-01T00:00:00Z)", () => {
  test("agrees with the platform's Date for zoned ISO times", () => {
    for (const s of ["2024-03-05T12:00:00Z", "2024-02-29T23:59:59.5Z", "1999-12-31T23:00:00-02:00", "2026-07-01 06:30+05:30"]) {
      expect(parseIsoTime(s)).toBe(Date.parse(s.replace(" ", "T")) / 1000);
    }
  });
  test("a time without a zone is unreadable unless a zone is supplied", () => {
    expect(Number.isNaN(parseIsoTime("2024-03-05T12:00:00"))).toBe(true);
    expect(parseIsoTime("2024-03-05T12:00:00", 3600)).toBe(Date.parse("2024-03-05T11:00:00Z") / 1000);
  });
  test("impossible dates are unreadable", () => {
    expect(Number.isNaN(parseIsoTime("2023-02-29T00:00:00Z"))).toBe(true);
    expect(Number.isNaN(parseIsoTime("2024-13-01T00:00:00Z"))).toBe(true);
    expect(Number.isNaN(parseIsoTime("yesterday"))).toBe(true);
  });
  test("patterns read day-first dates", () => {
    const p = compileTimePattern("DD/MM/YYYY hh:mm:ss", 0);
    expect(p("05/03/2024 12:00:30")).toBe(Date.parse("2024-03-05T12:00:30Z") / 1000);
    expect(Number.isNaN(p("2024-03-05 12:00:30"))).toBe(true);
  });
  test("day numbers match the platform calendar", () => {
    expect(daysFromCivil(1970, 1, 1)).toBe(0);
    expect(daysFromCivil(2000, 3, 1) * 86400 * 1000).toBe(Date.UTC(2000, 2, 1));
  });
});

describe("number fields: parseDecimal returns exactly what the platform's Number returns (ECMAScript StringToNumber)", () => {
  const same = (text: string, comma = false) => {
    const want = Number(comma ? text.replace(",", ".") : text);
    expect(Object.is(parseDecimal(text, comma), want), `${JSON.stringify(text)} comma=${comma}: got ${parseDecimal(text, comma)}, Number gives ${want}`).toBe(true);
  };
  test("edge cases: signs, zeros, bare points, long digit runs, exponents, blanks and words", () => {
    for (const t of ["0", "-0", "+0", "-0.0", "0.1", ".5", "5.", "-.5", "+12.5", "00012.50", "1015.99", "-12.31", "999999999999999", "9999999999999999",
      "0.000000000000001", "123456789.123456", "1.7976931348623157", "1e3", "1E-3", "-", "+", ".", "..", "1.2.3", " 12", "12 ", "",
      "NaN", "Infinity", "-Infinity", "0x10", "1_000", "12a", "٣", "1,5", "1.000,5"])
      for (const comma of [false, true]) same(t, comma);
  });
  test("any double written as a logger would (fixed decimals, precision, shortest form, with a comma mark) reads back as Number reads it", () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e12, max: 1e12 }), fc.integer({ min: 0, max: 12 }), fc.integer({ min: 1, max: 17 }), (x, k, p) => {
        for (const t of [x.toFixed(k), x.toPrecision(p), String(x)]) {
          same(t);
          same(t.replace(".", ","), true);
        }
      }),
      { numRuns: 3000 },
    );
  });
});

describe("canonicalizer", () => {
  test("converts units and bearings, reads missing codes and decimal commas, and reports bad fields by line and column", () => {
    const c = createCanonicalizer(
      map({
        delimiter: ";",
        decimalMark: ",",
        columns: [
          { column: "ws", variable: "wind_speed", unit: "knot" },
          { column: "wd", variable: "wind_to_direction", unit: "degree" },
          { column: "p", variable: "air_pressure", unit: "hPa" },
          { column: "cd", variable: "sea_water_velocity_to_direction", unit: "degree", reference: "magnetic", declinationDeg: -10 },
        ],
      }),
    );
    expect(c.bindHeader(["time", "ws", "wd", "p", "cd"], 1)).toEqual({ ok: true });
    const { chunk, warnings } = c.convert(
      [
        ["2024-03-05T12:00:00Z", "20", "45", "1013,25", "100"],
        ["2024-03-05T12:10:00Z", "-999", "350", "x", "5"],
        ["2024-03-05T12:20:00", "1", "1", "1000", "0"],
        [""],
      ],
      2,
    );
    expect(chunk.n).toBe(3);
    expect(chunk.values.wind_speed![0]).toBeCloseTo(10.2889, 4);
    expect(chunk.values.wind_from_direction![0]).toBe(225);
    expect(chunk.values.air_pressure![0]).toBeCloseTo(101325, 6);
    expect(chunk.values.sea_water_velocity_to_direction![0]).toBe(90);
    expect(chunk.values.sea_water_velocity_to_direction![1]).toBe(355);
    expect(Number.isNaN(chunk.values.wind_speed![1]!)).toBe(true);
    expect(chunk.bad.wind_speed![1]).toBe(0);
    expect(chunk.bad.air_pressure![1]).toBe(1);
    expect(chunk.recordBad[2]).toBe(1);
    expect(warnings).toEqual([
      { line: 3, column: "p", message: 'unreadable number "x"' },
      { line: 4, column: "time", message: 'unreadable time "2024-03-05T12:20:00" (a time needs a zone unless the column map gives one)' },
    ]);
  });
  test("a column missing from the header is named in the error", () => {
    const c = createCanonicalizer(map({ columns: [{ column: "gust", variable: "wind_speed_of_gust", unit: "m s-1" }] }));
    const r = c.bindHeader(["time", "ws"], 1);
    expect(r).toEqual({ ok: false, error: 'Column "gust" named in the column map is not in the header on line 1' });
  });
  test("platform ids become stable indexes across chunks", () => {
    const c = createCanonicalizer(map({ platformColumn: "id", columns: [{ column: "lat", variable: "latitude", unit: "degree_north" }] }));
    c.bindHeader(["time", "id", "lat"], 1);
    const a = c.convert([["2024-01-01T00:00Z", "B", "1"], ["2024-01-01T00:00Z", "A", "2"]], 2).chunk;
    const b = c.convert([["2024-01-01T01:00Z", "A", "3"]], 4).chunk;
    expect(Array.from(a.platform!)).toEqual([0, 1]);
    expect(Array.from(b.platform!)).toEqual([1]);
    expect(c.platformIds).toEqual(["B", "A"]);
  });
  test("numeric missing codes match exactly; zero, blanks and infinities are told apart", () => {
    const c = createCanonicalizer(map({ columns: [{ column: "t", variable: "air_temperature", unit: "degC" }] }));
    c.bindHeader(["time", "t"], 1);
    const rows = ["-999", "-999.5", "0", "   ", "Infinity", "NA", " 12.5 "].map((v, i) => [`2024-01-01T00:0${i}:00Z`, v]);
    const { chunk, warnings } = c.convert(rows, 2);
    const got = Array.from(chunk.values.air_temperature!).map((v) => (Number.isNaN(v) ? null : Number((v - 273.15).toFixed(6))));
    expect(got).toEqual([null, -999.5, 0, null, null, null, 12.5]);
    expect(Array.from(chunk.bad.air_temperature!)).toEqual([0, 0, 0, 0, 1, 0, 0]);
    expect(warnings).toEqual([{ line: 6, column: "t", message: 'unreadable number "Infinity"' }]);
  });
  test("a short row is a syntax error for the whole record", () => {
    const c = createCanonicalizer(map({ columns: [{ column: "ws", variable: "wind_speed", unit: "m s-1" }] }));
    c.bindHeader(["time", "ws"], 1);
    const { chunk, warnings } = c.convert([["2024-01-01T00:00Z"]], 2);
    expect(chunk.recordBad[0]).toBe(1);
    expect(warnings[0]).toEqual({ line: 2, message: "expected at least 2 fields, found 1" });
  });
});
