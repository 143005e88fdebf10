import { describe, expect, test } from "vitest";
import fc from "fast-check";
import { createEngine, FlatWindows, runEngine, TimeWindowRange, type EngineBlock } from "../../../../shared/compute/engine";
import { sliceChunk, type RecordChunk } from "../../../../shared/compute/canonical";
import { FLAG, TEST, testRaised } from "../../../../shared/compute/flags";
import { defaultQcSettings, type QcSettings } from "../../../../shared/schemas/qc-settings";
import type { DeploymentContext } from "../../../../shared/compute/diagnostics";
import type { MeasuredVariable } from "../../../../shared/vocabulary";

/** Builds a canonical chunk from plain arrays (time in s, values in canonical units). */
function chunk(time: number[], values: Partial<Record<MeasuredVariable, number[]>>, platform?: number[]): RecordChunk {
  const n = time.length;
  return {
    n,
    time: Float64Array.from(time),
    platform: platform ? Int32Array.from(platform) : null,
    line: Float64Array.from(time.map((_, i) => i + 2)),
    values: Object.fromEntries(Object.entries(values).map(([k, v]) => [k, Float64Array.from(v!)])),
    bad: {},
    recordBad: new Uint8Array(n),
  };
}

const mooring: DeploymentContext = { platformKind: "mooring", latitude: 45, longitude: -30, windHeightM: 10 };

function settingsWith(edit: (s: QcSettings) => void): QcSettings {
  const s = defaultQcSettings();
  edit(s);
  return s;
}

/** Runs and joins every block's columns into single arrays, for comparisons. */
function joined(blocks: EngineBlock[]) {
  const cat = <T extends Float64Array | Uint8Array | Uint32Array>(parts: T[]): number[] => parts.flatMap((p) => Array.from(p));
  const out: Record<string, number[]> = { time: cat(blocks.map((b) => b.time)) };
  const keys = Object.keys(blocks[0]?.values ?? {});
  for (const k of keys) {
    out[k] = cat(blocks.map((b) => b.values[k as MeasuredVariable]!));
    out[`${k}_qc`] = cat(blocks.map((b) => b.flags[k as MeasuredVariable]!));
    out[`${k}_tests`] = cat(blocks.map((b) => b.tests[k as MeasuredVariable]!));
  }
  for (const k of Object.keys(blocks[0]?.derived ?? {})) {
    out[k] = cat(blocks.map((b) => b.derived[k as never]!));
    out[`${k}_qc`] = cat(blocks.map((b) => b.derivedFlags[k as never]!));
  }
  return out;
}

function run(settings: QcSettings, ctx: DeploymentContext, c: RecordChunk, splits: number[] = []) {
  const e = createEngine(settings, ctx, Object.keys(c.values) as MeasuredVariable[]);
  const blocks: EngineBlock[] = [];
  let s = 0;
  for (const cut of [...splits, c.n]) {
    blocks.push(e.push(sliceChunk(c, s, cut)));
    s = cut;
  }
  blocks.push(e.finish());
  return { out: joined(blocks.filter((b) => b.n > 0)), summary: e.summary(), engine: e };
}

const seconds = (n: number, step = 600) => Array.from({ length: n }, (_, i) => 1_700_000_000 + i * step);

describe("aggregate flags", () => {
  test("a missing value is 9, a value no test ran on is 2, otherwise the worst test flag", () => {
    const s = settingsWith((x) => {
      x.variables.air_temperature = { sensor: null, user: null, climatology: null, spike: null, rateOfChange: null, flatLine: null, attenuatedSignal: null };
    });
    const { out } = run(s, mooring, chunk(seconds(3), { wind_speed: [5, NaN, 40], air_temperature: [290, 291, 292] }));
    expect(out.wind_speed_qc).toEqual([1, 9, 3]);
    // Timing and syntax ran on every record, so even with no variable tests the aggregate is pass, not 2.
    expect(out.air_temperature_qc).toEqual([1, 1, 1]);
  });
  test("a record that failed syntax fails every variable on it", () => {
    const c = chunk(seconds(3), { wind_speed: [5, 6, 7] });
    c.recordBad[1] = 1;
    const { out } = run(defaultQcSettings(), mooring, c);
    expect(out.wind_speed_qc![1]).toBe(FLAG.FAIL);
    expect(testRaised(out.wind_speed_tests![1]!, TEST.SYNTAX)).toBe(4);
  });
  test("an unreadable field fails that variable only", () => {
    const c = chunk(seconds(2), { wind_speed: [5, NaN], air_temperature: [290, 290.5] });
    c.bad.wind_speed = Uint8Array.from([0, 1]);
    const { out } = run(defaultQcSettings(), mooring, c);
    expect(out.wind_speed_qc).toEqual([1, 4]);
    expect(out.air_temperature_qc![1]).toBe(1);
  });
});

describe("gross range and climatology", () => {
  test("outside the sensor range fails (4), outside the user range is suspect (3)", () => {
    const { out } = run(defaultQcSettings(), mooring, chunk(seconds(4), { wind_speed: [10, 36, 61, -1] }));
    expect(out.wind_speed_qc).toEqual([1, 3, 4, 4]);
    expect(testRaised(out.wind_speed_tests![1]!, TEST.GROSS_RANGE)).toBe(3);
    expect(testRaised(out.wind_speed_tests![2]!, TEST.GROSS_RANGE)).toBe(4);
  });
  test("climatology uses the bounds of the record's month (UTC)", () => {
    const s = settingsWith((x) => {
      x.variables.air_temperature!.climatology = { min: Array(12).fill(270), max: Array(12).fill(300).map((v, i) => (i === 0 ? 280 : v)) };
      x.variables.air_temperature!.rateOfChange = null;
      x.variables.air_temperature!.spike = null;
    });
    const jan = Date.UTC(2026, 0, 15) / 1000;
    const feb = Date.UTC(2026, 1, 15) / 1000;
    const { out } = run(s, mooring, chunk([jan, feb], { air_temperature: [290, 290] }));
    expect(out.air_temperature_qc).toEqual([3, 1]);
  });
});

describe("window tests", () => {
  test("a spike is flagged on the middle value, suspect or fail by size", () => {
    const s = settingsWith((x) => {
      x.variables.wind_speed!.rateOfChange = null;
      x.variables.wind_speed!.flatLine = null;
      x.variables.wind_speed!.user = null;
    });
    const { out } = run(s, mooring, chunk(seconds(7), { wind_speed: [5, 5.1, 14, 5.2, 5.1, 30, 5.0] }));
    expect(testRaised(out.wind_speed_tests![2]!, TEST.SPIKE)).toBe(3);
    expect(testRaised(out.wind_speed_tests![5]!, TEST.SPIKE)).toBe(4);
    expect(testRaised(out.wind_speed_tests![1]!, TEST.SPIKE)).toBe(0);
    // The first and last values have no neighbour on one side: the spike test does not run there.
    expect(out.wind_speed_qc![0]).toBe(1);
  });
  test("flat line: K = 3 equal values before the current one is suspect, K = 5 fails", () => {
    const s = settingsWith((x) => {
      x.variables.wind_speed!.rateOfChange = null;
      x.variables.wind_speed!.spike = null;
    });
    const { out } = run(s, mooring, chunk(seconds(7), { wind_speed: [7, 7, 7, 7, 7, 7, 8] }));
    expect(out.wind_speed_qc).toEqual([1, 1, 1, 3, 3, 4, 1]);
  });
  test("flat line at 1 Hz: the handbook's hourly K = 3 and 5 mean 3 h and 5 h of equal readings, not 3 and 5 readings", () => {
    // DOMAIN §11: K = 3 → suspect, K = 5 → fail "for hourly wind"; holding those spans at any sampling interval is
    // common practice (no single source). At 1 Hz: suspect once the previous 10,800 readings are all within
    // epsilon, fail once the previous 18,000 are. Run whole and in uneven pieces: the window crosses pieces.
    const s = settingsWith((x) => {
      x.variables.wind_speed!.rateOfChange = null;
      x.variables.wind_speed!.spike = null;
      x.timing.expectedIntervalS = 1;
    });
    const n = 20_000;
    const t0 = Date.UTC(2026, 9, 1) / 1000;
    // Ordinary 1 Hz wind at 0.1 m/s resolution repeats often; a short run of equal readings must stay good.
    const ws = Array.from({ length: n }, (_, i) => (i < 50 ? 7 + 0.1 * (i % 2) : 7));
    const c = chunk(Array.from({ length: n }, (_, i) => t0 + i), { wind_speed: ws });
    for (const splits of [[], [4096, 10_850, 18_049]]) {
      const { out } = run(s, mooring, c, splits);
      const q = out.wind_speed_qc!;
      const firstSuspect = q.indexOf(3);
      const firstFail = q.indexOf(4);
      // The last differing reading (7.1) is index 49; the first reading with 10,800 equal ones before it is
      // 50 + 10,800, the first with 18,000 is 50 + 18,000.
      expect(firstSuspect).toBe(50 + 10_800);
      expect(firstFail).toBe(50 + 18_000);
      expect(q.slice(0, firstSuspect).every((f) => f === 1)).toBe(true);
    }
    // With the time spans switched off the counts alone apply, as for hourly data.
    const counts = settingsWith((x) => {
      x.variables.wind_speed!.rateOfChange = null;
      x.variables.wind_speed!.spike = null;
      x.variables.wind_speed!.flatLine = { epsilon: 0.05, suspectCount: 3, failCount: 5, suspectAfterS: null, failAfterS: null };
      x.timing.expectedIntervalS = 600;
    });
    expect(run(counts, mooring, chunk(seconds(7), { wind_speed: [7, 7, 7, 7, 7, 7, 8] })).out.wind_speed_qc).toEqual([1, 1, 1, 3, 3, 4, 1]);
  });
  test("the flat-line windows agree with checking every earlier value one by one", () => {
    // Reference: the definition itself (the last K values all within epsilon of the current one), computed naively.
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 12 }),
        fc.integer({ min: 0, max: 12 }),
        fc.array(fc.integer({ min: -3, max: 3 }), { minLength: 1, maxLength: 300 }),
        fc.constantFrom(0, 0.5, 1, 2),
        (s, extra, steps, eps) => {
          const f = s + extra;
          const xs: number[] = [];
          let v = 0;
          for (const d of steps) xs.push((v += d % 2 === 0 ? 0 : d));
          const w = new FlatWindows(s, f);
          xs.forEach((x, i) => {
            if (i >= s) {
              const within = (k: number) => i >= k && xs.slice(i - k, i).every((y) => Math.abs(y - x) <= eps);
              expect(w.flag(x, eps)).toBe(within(f) ? 4 : within(s) ? 3 : 1);
            }
            w.push(x);
          });
        },
      ),
      { numRuns: 300 },
    );
  });
  test("attenuated signal: a trailing window whose range falls below the floors is suspect, then fail", () => {
    // DOMAIN §11 #10 (QARTOD's suggested attenuated-signal test; the range form, from memory): range of the values
    // in (t − window, t] below failBelow → 4, below suspectBelow → 3. Hand-worked: 1-minute wind, a 600 s window
    // holds this value and the 9 before it.
    const s = settingsWith((x) => {
      x.timing.expectedIntervalS = 60;
      const w = x.variables.wind_speed!;
      w.spike = null;
      w.rateOfChange = null;
      w.flatLine = null;
      w.attenuatedSignal = { windowS: 600, suspectBelow: 0.5, failBelow: 0.2, minCount: 5 };
    });
    // 0–19 swing between 4 and 6 (range 2); 20–39 between 5.0 and 5.3 (range 0.3); 40–59 between 5.0 and 5.1.
    const ws = Array.from({ length: 60 }, (_, i) => (i < 20 ? 5 + (i % 2 ? 1 : -1) : i < 40 ? 5 + 0.3 * (i % 2) : 5 + 0.1 * (i % 2)));
    const { out, summary } = run(s, mooring, chunk(seconds(60, 60), { wind_speed: ws }));
    // From 29 the window (20–29) holds only the 0.3 band: suspect. Index 39 (5.3) stays in the window up to 48;
    // from 49 the window is 40–49, range 0.1: fail.
    const expected = ws.map((_, i) => (i < 29 ? 1 : i < 49 ? 3 : 4));
    expect(out.wind_speed_qc).toEqual(expected);
    expect(testRaised(out.wind_speed_tests![35]!, TEST.ATTENUATED_SIGNAL)).toBe(3);
    expect(testRaised(out.wind_speed_tests![55]!, TEST.ATTENUATED_SIGNAL)).toBe(4);
    expect(summary.testCounts.wind_speed!.ATTENUATED_SIGNAL).toEqual([20, 11]);
    // A dead-still sensor from the first reading: judged (fail) only once the window spans half of it, 300 s,
    // which at one value a minute is the sixth reading (index 5), though minCount 2 is reached at index 1.
    const still = settingsWith((x) => {
      x.variables.wind_speed = { ...x.variables.wind_speed!, spike: null, rateOfChange: null, flatLine: null, attenuatedSignal: { windowS: 600, suspectBelow: 0.5, failBelow: 0.2, minCount: 2 } };
    });
    expect(run(still, mooring, chunk(seconds(8, 60), { wind_speed: Array(8).fill(5) })).out.wind_speed_qc).toEqual([1, 1, 1, 1, 1, 4, 4, 4]);
    // Fewer values than minCount in the window: not evaluated by this test (only gross range ran: pass).
    const few = settingsWith((x) => {
      x.variables.wind_speed = { ...x.variables.wind_speed!, spike: null, rateOfChange: null, flatLine: null, attenuatedSignal: { windowS: 600, suspectBelow: 0.5, failBelow: 0.2, minCount: 20 } };
    });
    expect(run(few, mooring, chunk(seconds(12, 60), { wind_speed: Array(12).fill(5) })).out.wind_speed_tests!.every((t) => testRaised(t, TEST.ATTENUATED_SIGNAL) === 0)).toBe(true);
  });
  test("the attenuated-signal window agrees with scanning the trailing values one by one", () => {
    // Reference: the definition itself — largest minus smallest of the values with time in (t − window, t] — naively.
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 50 }),
        fc.array(fc.tuple(fc.integer({ min: 0, max: 7 }), fc.integer({ min: -20, max: 20 })), { minLength: 1, maxLength: 300 }),
        (windowS, steps) => {
          const w = new TimeWindowRange(windowS);
          const ts: number[] = [];
          const xs: number[] = [];
          let t = 0;
          for (const [dt, x] of steps) {
            t += dt;
            ts.push(t);
            xs.push(x / 4);
            w.push(t, x / 4);
            const inWin = xs.filter((_, j) => ts[j]! > t - windowS);
            expect(w.count).toBe(inWin.length);
            expect(w.oldest()).toBe(ts.find((u) => u > t - windowS));
            expect(w.range()).toBe(Math.max(...inWin) - Math.min(...inWin));
          }
        },
      ),
      { numRuns: 300 },
    );
  });
  test("rate of change flags a step beyond N·σ of the trailing window", () => {
    const s = settingsWith((x) => {
      x.variables.air_pressure!.spike = null;
      x.variables.air_pressure!.rateOfChange = { n: 3, windowS: 86400, minCount: 3 };
    });
    const p = [101000, 101010, 100990, 101005, 100995, 101000, 102000];
    const { out } = run(s, mooring, chunk(seconds(p.length), { air_pressure: p }));
    expect(testRaised(out.air_pressure_tests![6]!, TEST.RATE_OF_CHANGE)).toBe(3);
    expect(out.air_pressure_qc!.slice(0, 6).every((f) => f === 1)).toBe(true);
  });
});

describe("timing and gaps", () => {
  test("duplicates and out-of-order times fail, a gap gets the gap flag", () => {
    const s = settingsWith((x) => {
      x.timing.expectedIntervalS = 600;
    });
    const t = [0, 600, 600, 300, 1200, 4800].map((x) => 1_700_000_000 + x);
    const { out } = run(s, mooring, chunk(t, { air_temperature: [290, 290.1, 290.2, 290.1, 290.2, 290.3] }));
    expect(out.air_temperature_qc).toEqual([1, 1, 4, 4, 1, 4]);
    expect(testRaised(out.air_temperature_tests![5]!, TEST.GAP)).toBe(4);
  });
  test("with no stated interval the gap test does not flag long steps", () => {
    const { out } = run(defaultQcSettings(), mooring, chunk([0, 600, 90000].map((x) => x + 1_700_000_000), { air_temperature: [290, 290.1, 290.2] }));
    expect(out.air_temperature_qc).toEqual([1, 1, 1]);
  });
});

describe("multi-variate checks", () => {
  test("a gust below the mean speed is suspect", () => {
    const { out } = run(defaultQcSettings(), mooring, chunk(seconds(2), { wind_speed: [8, 8.2], wind_speed_of_gust: [10, 7] }));
    expect(out.wind_speed_of_gust_qc).toEqual([1, 3]);
    expect(testRaised(out.wind_speed_of_gust_tests![1]!, TEST.MULTI_VARIATE)).toBe(3);
  });
  test("below 1 m/s the wind direction is not evaluated (2); light wind swinging wildly is suspect", () => {
    const { out } = run(defaultQcSettings(), mooring, chunk(seconds(4), { wind_speed: [0.5, 2, 2.2, 2.1], wind_from_direction: [10, 20, 200, 210] }));
    expect(out.wind_from_direction_qc).toEqual([2, 1, 3, 1]);
    // The components filled from a calm record carry the direction's "not evaluated".
    expect(out.eastward_wind_qc![0]).toBe(2);
  });
});

describe("location and drifters", () => {
  const drifter: DeploymentContext = { platformKind: "drifter" };
  test("impossible positions fail; a mooring outside its watch circle is suspect", () => {
    const s = settingsWith((x) => {
      x.location.watchCircleM = 2000;
    });
    const { out } = run(s, { ...mooring, latitude: 45, longitude: -30 }, chunk(seconds(3), { latitude: [45.001, 45.05, 95], longitude: [-30, -30, -30] }));
    expect(out.latitude_qc).toEqual([1, 3, 4]);
  });
  test("implied speed flags the fix whose two legs are both fast, not its neighbours", () => {
    // Hourly fixes moving ~0.3 m/s north, with fix 3 displaced 20 km east.
    const lat = [30, 30.01, 30.02, 30.03, 30.04, 30.05];
    const lon = [-140, -140, -140, -139.8, -140, -140];
    const { out } = run(defaultQcSettings(), drifter, chunk(seconds(6, 3600), { latitude: lat, longitude: lon }));
    expect(out.latitude_qc).toEqual([1, 1, 1, 4, 1, 1]);
    expect(testRaised(out.latitude_tests![3]!, TEST.IMPLIED_SPEED)).toBe(4);
  });
  test("drifter velocity is centred over the neighbouring fixes and agrees with the geodesic", () => {
    const { out } = run(defaultQcSettings(), drifter, chunk(seconds(3, 3600), { latitude: [30, 30.01, 30.02], longitude: [-140, -139.99, -139.98] }));
    // Middle fix: (30, −140) → (30.02, −139.98) over 7200 s; the pair at half the step gives ~0.408 m/s (DOMAIN §10).
    expect(out.platform_speed_wrt_ground![1]).toBeCloseTo(0.4082, 3);
    expect(out.platform_speed_wrt_ground_qc![1]).toBe(1);
  });
});

describe("streaming", () => {
  const arbSeries = fc
    .record({
      n: fc.integer({ min: 1, max: 120 }),
      seed: fc.integer({ min: 1, max: 1_000_000 }),
      platforms: fc.integer({ min: 1, max: 3 }),
    })
    .chain(({ n, seed, platforms }) =>
      fc.record({
        n: fc.constant(n),
        seed: fc.constant(seed),
        platforms: fc.constant(platforms),
        splits: fc.uniqueArray(fc.integer({ min: 1, max: Math.max(1, n - 1) }), { maxLength: 8 }).map((a) => a.filter((x) => x < n).sort((p, q) => p - q)),
      }),
    );

  /** Deterministic rough series with spikes, flat runs, gaps, duplicates and missing values. */
  function series(n: number, seed: number, platforms: number): RecordChunk {
    let a = seed;
    const rnd = () => ((a = (a * 16807) % 2147483647) / 2147483647);
    const time: number[] = [];
    const plat: number[] = [];
    const ws: number[] = [];
    const wd: number[] = [];
    const p: number[] = [];
    const lat: number[] = [];
    const lon: number[] = [];
    const clock = new Array(platforms).fill(1_700_000_000);
    for (let i = 0; i < n; i++) {
      const k = Math.floor(rnd() * platforms);
      const r = rnd();
      clock[k] += r < 0.05 ? 0 : r < 0.08 ? -300 : r < 0.12 ? 5000 : 600;
      time.push(clock[k]);
      plat.push(k);
      const q = rnd();
      // Often a repeat of the last value, so flat runs of several records are common.
      ws.push(q < 0.05 ? NaN : q < 0.1 ? 30 : q < 0.6 ? 6 : 3 + 6 * rnd());
      wd.push(360 * rnd());
      p.push(101000 + 300 * rnd() + (q > 0.95 ? 2000 : 0));
      lat.push(30 + 0.01 * i + (q > 0.97 ? 0.5 : 0));
      lon.push(-140 + 0.005 * k);
    }
    return chunk(time, { wind_speed: ws, wind_from_direction: wd, air_pressure: p, latitude: lat, longitude: lon }, platforms > 1 ? plat : undefined);
  }

  test("any split into chunks gives exactly the output of the whole series (mooring and drifter)", () => {
    fc.assert(
      fc.property(arbSeries, fc.constantFrom<DeploymentContext>(mooring, { platformKind: "drifter" }), ({ n, seed, platforms, splits }, ctx) => {
        const s = settingsWith((x) => {
          x.timing.expectedIntervalS = 600;
          x.variables.air_pressure!.rateOfChange = { n: 2, windowS: 3000, minCount: 2 };
          x.variables.wind_speed!.attenuatedSignal = { windowS: 3000, suspectBelow: 4, failBelow: 1, minCount: 3 };
        });
        const c = series(n, seed, platforms);
        const whole = run(s, ctx, c).out;
        const parts = run(s, ctx, c, splits).out;
        expect(parts).toEqual(whole);
      }),
      { numRuns: 120 },
    );
    // Generous limit: many engines run here, and shared CI machines can be slow.
  }, 60_000);

  test("interleaved platforms get the same flags as each platform run alone", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1_000_000 }), fc.integer({ min: 4, max: 80 }), (seed, n) => {
        const s = settingsWith((x) => {
          x.timing.expectedIntervalS = 600;
        });
        const c = series(n, seed, 2);
        const both = run(s, { platformKind: "drifter" }, c).out;
        for (const p of [0, 1]) {
          const idx = Array.from(c.platform!).flatMap((q, i) => (q === p ? [i] : []));
          if (idx.length === 0) continue;
          const pick = (a: Float64Array) => idx.map((i) => a[i]!);
          const alone = run(s, { platformKind: "drifter" }, chunk(pick(c.time), Object.fromEntries(Object.entries(c.values).map(([k, v]) => [k, pick(v!)])))).out;
          for (const key of ["wind_speed_qc", "air_pressure_qc", "latitude_qc", "platform_speed_wrt_ground"]) {
            expect(idx.map((i) => both[key]![i])).toEqual(alone[key]);
          }
        }
      }),
      { numRuns: 100 },
    );
  }, 60_000);

  test("reused block arrays carry the same numbers as fresh ones", () => {
    const c = series(200, 42, 1);
    const vars = Object.keys(c.values) as MeasuredVariable[];
    const fresh = runEngine(defaultQcSettings(), mooring, [c], vars);
    const e = createEngine(defaultQcSettings(), mooring, vars, { reuseBlocks: true });
    const copies: EngineBlock[] = [];
    const keep = (b: EngineBlock): EngineBlock => structuredClone(b);
    for (let s = 0; s < c.n; s += 37) copies.push(keep(e.push(sliceChunk(c, s, Math.min(c.n, s + 37)))));
    copies.push(keep(e.finish()));
    expect(joined(copies.filter((b) => b.n > 0))).toEqual(joined(fresh.blocks));
  });
});

describe("summary and provenance", () => {
  test("counts flags per variable and test, and records methods and constants", () => {
    const { summary, engine } = run(defaultQcSettings(), mooring, chunk(seconds(4), { wind_speed: [10, 36, 61, NaN] }));
    expect(summary.rows).toBe(4);
    expect(summary.flagCounts.wind_speed).toEqual([0, 1, 0, 1, 1, 0, 0, 0, 0, 1]);
    expect(summary.testCounts.wind_speed!.GROSS_RANGE).toEqual([1, 1]);
    expect(engine.provenance.dragLaw).toBe("LP81");
    expect(engine.provenance.seawaterDensity).toMatchObject({ method: "fixed", value: 1025 });
    expect(engine.provenance.caution).toMatch(/not for navigation/);
  });
});

describe("edge cases", () => {
  test("an empty chunk and an empty run give empty blocks and zero counts", () => {
    const { out, summary } = run(defaultQcSettings(), mooring, chunk([], { wind_speed: [] }));
    expect(out.time ?? []).toEqual([]);
    expect(summary.rows).toBe(0);
  });
  test("a single record passes through with window tests not run", () => {
    const { out } = run(defaultQcSettings(), mooring, chunk([1_700_000_000], { wind_speed: [7] }));
    expect(out.wind_speed_qc).toEqual([1]);
    expect(out.wind_speed_tests).toEqual([0]);
  });
  test("an all-missing series is flagged 9 throughout and its derived values are missing too", () => {
    const { out } = run(defaultQcSettings(), mooring, chunk(seconds(4), { wind_speed: [NaN, NaN, NaN, NaN], wind_from_direction: [NaN, NaN, NaN, NaN] }));
    expect(out.wind_speed_qc).toEqual([9, 9, 9, 9]);
    expect(out.surface_downward_eastward_stress_qc).toEqual([9, 9, 9, 9]);
    expect(out.ekman_transport_eastward!.every((x) => Number.isNaN(x))).toBe(true);
  });
});

test("records masked near the equator are counted with the reason", () => {
  const { summary } = run(defaultQcSettings(), { platformKind: "drifter" }, chunk(seconds(3, 3600), { latitude: [2, 2.01, 6], longitude: [10, 10, 10], wind_speed: [5, 5, 5], wind_from_direction: [90, 90, 90] }));
  expect(summary.notes).toEqual({ "Ekman quantities not evaluated within 5° of the equator": 2 });
});
