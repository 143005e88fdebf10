import { describe, expect, test } from "vitest";
import Papa from "papaparse";
import { demoFleetDefaults, demoMooringColumnMap, demoMooringDefaults, generateFleet, generateMooring, mooringChunks, mooringCsv } from "../../../../shared/demo/generate";
import { columnMapSchema } from "../../../../shared/schemas/column-map";
import { createCanonicalizer } from "../../../../shared/compute/canonical";
import { haversine } from "../../../../shared/compute/geodesy";

const small = { ...demoMooringDefaults, durationS: 5 * 86400 };

describe("demo generator", () => {
  test("the same seed gives the same series and another seed a different one", () => {
    const a = [...mooringChunks(small)][0]!;
    const b = [...mooringChunks(small)][0]!;
    const c = [...mooringChunks({ ...small, seed: small.seed + 1 })][0]!;
    expect(Array.from(a.wind_speed)).toEqual(Array.from(b.wind_speed));
    expect(Array.from(a.wind_speed)).not.toEqual(Array.from(c.wind_speed));
  });
  test("the whole series equals its chunks joined, whatever the chunk size", () => {
    const whole = generateMooring(small);
    const pieces = [...mooringChunks(small, 97)];
    expect(whole.n).toBe(small.durationS / small.intervalS);
    expect(Array.from(whole.air_pressure)).toEqual(pieces.flatMap((c) => Array.from(c.air_pressure)));
  });
  test("values stay within plausible ranges and the storm drops the pressure", () => {
    const c = [...mooringChunks({ ...demoMooringDefaults })][0]!;
    const min = (x: Float64Array) => x.reduce((m, v) => Math.min(m, v), Infinity);
    const max = (x: Float64Array) => x.reduce((m, v) => Math.max(m, v), -Infinity);
    expect(min(c.wind_speed)).toBeGreaterThan(0);
    expect(max(c.wind_speed)).toBeLessThan(35);
    expect(max(c.wind_speed)).toBeGreaterThan(15);
    expect(min(c.air_pressure)).toBeLessThan(995);
    expect(min(c.air_pressure)).toBeGreaterThan(950);
    expect(max(c.relative_humidity)).toBeLessThanOrEqual(100);
    for (let i = 0; i < c.n; i++) expect(c.gust[i]).toBeGreaterThan(c.wind_speed[i]!);
  });
  test("the CSV parses through its own column map with no warnings", () => {
    const text = [...mooringCsv(small, 200)].join("");
    const rows = Papa.parse<string[]>(text.trim()).data;
    const can = createCanonicalizer(columnMapSchema.parse(demoMooringColumnMap()));
    expect(can.bindHeader(rows[0]!, 1)).toEqual({ ok: true });
    const { chunk, warnings } = can.convert(rows.slice(1), 2);
    expect(warnings).toEqual([]);
    expect(chunk.n).toBe(small.durationS / small.intervalS);
    expect(chunk.values.relative_humidity![0]).toBeLessThanOrEqual(1);
  });
  test("drifters move at open-ocean speeds (0.05–0.6 m/s between hourly fixes)", () => {
    const f = generateFleet(demoFleetDefaults);
    const k = demoFleetDefaults.count;
    for (let i = 0; i + k < f.time.length; i += 7) {
      const s = haversine(f.latitude[i]!, f.longitude[i]!, f.latitude[i + k]!, f.longitude[i + k]!) / demoFleetDefaults.intervalS;
      expect(s).toBeGreaterThan(0.0);
      expect(s).toBeLessThan(0.6);
    }
  });
});
