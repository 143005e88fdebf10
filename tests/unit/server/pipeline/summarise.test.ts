import { describe, expect, test } from "vitest";
import { createSummariser } from "../../../../server/pipeline/summarise";

describe("version summaries", () => {
  // Hand-made series at 60 s with one 10-minute hole: times 0..4 min, then 15..19 min.
  const t = Float64Array.from([0, 1, 2, 3, 4, 15, 16, 17, 18, 19].map((m) => 1_790_812_800 + m * 60));
  const x = Float64Array.from([1, 2, 3, 4, 100, 6, 7, 8, 9, NaN]);
  const f = Uint8Array.from([1, 1, 1, 2, 4, 1, 1, 3, 1, 9]);
  const idx = Int32Array.from(t.map((_, i) => i));

  test("statistics use pass and not-evaluated values; flags are counted; gaps and coverage follow the interval", () => {
    const s = createSummariser(["wind_speed"], ["m s-1"], 60, 2);
    s.add("", t, [x], [f], idx, 0, 5);
    s.add("", t, [x], [f], idx, 5, 10);
    const sum = s.summary();
    // Values with flag 1 or 2: 1, 2, 3, 4, 6, 7, 9 → mean 32/7, sample variance by hand.
    const good = [1, 2, 3, 4, 6, 7, 9];
    const mean = good.reduce((a, b) => a + b, 0) / good.length;
    const sd = Math.sqrt(good.reduce((a, b) => a + (b - mean) ** 2, 0) / (good.length - 1));
    const v = sum.variables[0]!;
    expect(v.count).toBe(7);
    expect(v.min).toBe(1);
    expect(v.max).toBe(9);
    expect(v.mean).toBeCloseTo(mean, 12);
    expect(v.std).toBeCloseTo(sd, 12);
    expect([v.flags[1], v.flags[2], v.flags[3], v.flags[4], v.flags[9]]).toEqual([6, 1, 1, 1, 1]);
    expect(sum.gapCount).toBe(1);
    expect(sum.gaps[0]).toMatchObject({ seconds: 660 });
    // 10 records over 0..19 minutes at 60 s: 20 expected.
    expect(sum.coverage).toBe(0.5);
  });

  test("mean and standard deviation keep their precision for large values with small spread, fed in pieces", () => {
    // Reference: the two-pass definition (mean first, then Σ(x − mean)² / (n − 1)), common practice. A month of
    // pressure-like values, 101,325 Pa ± 0.05 Pa: a naive Σx² would lose every digit of the spread.
    const n = 200_000;
    const time = Float64Array.from({ length: n }, (_, i) => 1_790_812_800 + i);
    const p = Float64Array.from({ length: n }, (_, i) => 101_325 + 0.05 * Math.sin(i * 0.37) + 0.01 * Math.cos(i * 1.3));
    const flags = new Uint8Array(n).fill(1);
    const all = Int32Array.from({ length: n }, (_, i) => i);
    const s = createSummariser(["air_pressure"], ["Pa"], 1, 2);
    for (let from = 0; from < n; from += 4096) s.add("", time, [p], [flags], all, from, Math.min(n, from + 4096));
    let m = 0;
    for (const x of p) m += x;
    m /= n;
    let ss = 0;
    for (const x of p) ss += (x - m) ** 2;
    const sd = Math.sqrt(ss / (n - 1));
    const v = s.summary().variables[0]!;
    expect(Math.abs(v.mean! - m)).toBeLessThan(1e-9);
    expect(Math.abs(v.std! - sd) / sd).toBeLessThan(1e-9);
  });

  test("plot buckets hold min, max, mean and the worst flag; empty buckets are NaN with flag 9", () => {
    const s = createSummariser(["wind_speed"], ["m s-1"], 60, 2);
    s.add("", t, [x], [f], idx, 0, 10);
    const rows = [...s.plotSeries()];
    const minute = rows.find((r) => r.stepS === 60)!;
    expect(minute.n.slice(0, 6)).toEqual([1, 1, 1, 1, 1, 0]);
    expect(minute.worstFlag[4]).toBe(4);
    expect(minute.min[5]).toBeNaN();
    expect(minute.worstFlag[5]).toBe(9);
    const hour = rows.find((r) => r.stepS === 3600)!;
    expect(hour.n[0]).toBe(9);
    expect(hour.min[0]).toBe(1);
    expect(hour.max[0]).toBe(100);
    expect(hour.mean[0]).toBeCloseTo((1 + 2 + 3 + 4 + 100 + 6 + 7 + 8 + 9) / 9, 12);
    expect(hour.worstFlag[0]).toBe(4);
  });
});
