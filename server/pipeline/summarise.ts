import type { VariableStats, VersionSummaryData } from "@shared/schemas/versions";

/**
 * Streaming summaries of a version's rows, fed in time order per platform: per-variable statistics and flag counts,
 * time coverage and gaps, and pre-aggregated plot buckets (per minute, folded to 5 and 15 minutes and hours). O(rows × variables), memory
 * O(buckets × variables). Statistics use the values flagged 1 (pass) or 2 (not evaluated); NaN values are skipped.
 */

/**
 * Plot bucket sizes, s: minutes in the hot loop, the rest folded from them at the end. Levels at most 5× apart keep any
 * plot window's read to a few thousand buckets per series (server/services/explore.ts picks the level).
 */
export const PLOT_STEPS_S = [60, 300, 900, 3600] as const;

interface Buckets {
  step: number;
  t0: number;
  len: number;
  min: Float64Array[];
  max: Float64Array[];
  sum: Float64Array[];
  n: Float64Array[];
  worst: Uint8Array[];
}

interface PlatformAcc {
  rows: number;
  first: number;
  last: number;
  buckets: Buckets[];
}

export interface PlotSeriesRow {
  platform: string;
  variable: string;
  stepS: number;
  t0: number;
  min: number[];
  max: number[];
  mean: number[];
  n: number[];
  worstFlag: number[];
}

export interface Gap {
  platform: string;
  from: number;
  to: number;
}

/** Writes one plot bucket's running min, max, sum, count and worst flag back to its arrays. */
function putBucket(mn: Float64Array, mx: Float64Array, sm: Float64Array, nn: Float64Array, w: Uint8Array, j: number, lo: number, hi: number, sum: number, n: number, worst: number) {
  mn[j] = lo;
  mx[j] = hi;
  sm[j] = sum;
  nn[j] = n;
  w[j] = worst;
}

/** Folds fine buckets into coarser ones (step a multiple of the fine step). O(fine buckets × variables). */
function foldBuckets(f: Buckets, step: number, nv: number): Buckets {
  const t0 = Math.floor(f.t0 / step) * step;
  const k = step / f.step;
  const off = (f.t0 - t0) / f.step;
  const len = Math.ceil((off + f.len) / k);
  const b: Buckets = {
    step,
    t0,
    len,
    min: [],
    max: [],
    sum: [],
    n: [],
    worst: [],
  };
  for (let v = 0; v < nv; v++) {
    const mn = new Float64Array(len).fill(Infinity), mx = new Float64Array(len).fill(-Infinity), sm = new Float64Array(len), nn = new Float64Array(len), w = new Uint8Array(len);
    for (let j = 0; j < f.len; j++) {
      const J = Math.floor((j + off) / k);
      if (f.min[v]![j]! < mn[J]!) mn[J] = f.min[v]![j]!;
      if (f.max[v]![j]! > mx[J]!) mx[J] = f.max[v]![j]!;
      sm[J]! += f.sum[v]![j]!;
      nn[J]! += f.n[v]![j]!;
      if (f.worst[v]![j]! > w[J]!) w[J] = f.worst[v]![j]!;
    }
    b.min.push(mn);
    b.max.push(mx);
    b.sum.push(sm);
    b.n.push(nn);
    b.worst.push(w);
  }
  return b;
}

export function createSummariser(variables: readonly string[], units: readonly string[], intervalS: number | null, gapFactor: number) {
  const nv = variables.length;
  const platforms = new Map<string, PlatformAcc>();
  const flagCounts = variables.map(() => new Float64Array(10));
  // Statistics by shifted sums: Σ(x − K) and Σ(x − K)² with K the variable's first counted value. Welford's
  // update divides on every value along one dependency chain (~0.6 s of a month at 1 Hz); shifted sums only add,
  // and with K inside the data's range they keep its precision (Chan, Golub & LeVeque 1983, "Algorithms for
  // computing the sample variance", The American Statistician 37(3); from memory).
  const count = new Float64Array(nv);
  const shift = new Float64Array(nv).fill(NaN);
  const sum1 = new Float64Array(nv);
  const sum2 = new Float64Array(nv);
  const min = new Float64Array(nv).fill(Infinity);
  const max = new Float64Array(nv).fill(-Infinity);
  const maxGap = intervalS ? intervalS * gapFactor : Infinity;
  let gaps: Gap[] = [];
  let gapCount = 0;
  let bucketOf = new Int32Array(0);

  const newBuckets = (step: number, t: number): Buckets => ({
    step,
    t0: Math.floor(t / step) * step,
    len: 0,
    min: variables.map(() => new Float64Array(0)),
    max: variables.map(() => new Float64Array(0)),
    sum: variables.map(() => new Float64Array(0)),
    n: variables.map(() => new Float64Array(0)),
    worst: variables.map(() => new Uint8Array(0)),
  });
  const growTo = (b: Buckets, need: number) => {
    if (need <= b.min[0]!.length || nv === 0) {
      if (need > b.len) b.len = need;
      return;
    }
    const cap = Math.max(need, b.min[0]!.length * 2, 256);
    const g = <T extends Float64Array | Uint8Array>(a: T, fill: number): T => {
      const x = new (a.constructor as new (n: number) => T)(cap);
      x.fill(fill as never);
      x.set(a as never);
      return x;
    };
    for (let v = 0; v < nv; v++) {
      b.min[v] = g(b.min[v]!, Infinity);
      b.max[v] = g(b.max[v]!, -Infinity);
      b.sum[v] = g(b.sum[v]!, 0);
      b.n[v] = g(b.n[v]!, 0);
      b.worst[v] = g(b.worst[v]!, 0);
    }
    b.len = need;
  };
  const noteGap = (g: Gap) => {
    gapCount++;
    if (gaps.length < 50) gaps.push(g);
    else {
      let k = 0;
      for (let j = 1; j < gaps.length; j++) if (gaps[j]!.to - gaps[j]!.from < gaps[k]!.to - gaps[k]!.from) k = j;
      if (g.to - g.from > gaps[k]!.to - gaps[k]!.from) gaps[k] = g;
    }
  };

  return {
    /**
     * Adds rows [from, to) of one platform; `values[v]`/`flags[v]` follow `variables` (null = not in this build:
     * counted as missing). Rows must come in increasing time per platform.
     */
    add(platform: string, time: Float64Array, values: (Float64Array | null)[], flags: (Uint8Array | null)[], idx: Int32Array, from: number, to: number) {
      if (to <= from) return;
      let p = platforms.get(platform);
      if (!p) {
        const t = time[idx[from]!]!;
        // Only minute buckets in the hot loop; hour buckets are folded from them at the end.
        p = { rows: 0, first: t, last: NaN, buckets: [newBuckets(PLOT_STEPS_S[0], t)] };
        platforms.set(platform, p);
      }
      // Timing and coverage; each row's minute bucket, found once for all variables.
      const b1 = p.buckets[0]!;
      const s1 = b1.step, t01 = b1.t0;
      if (bucketOf.length < to - from) bucketOf = new Int32Array(Math.max(to - from, bucketOf.length * 2));
      let last = p.last;
      for (let k = from; k < to; k++) {
        const t = time[idx[k]!]!;
        if (last === last && t - last > maxGap) noteGap({ platform, from: last, to: t });
        last = t;
        bucketOf[k - from] = Math.floor((t - t01) / s1);
      }
      p.last = last;
      p.rows += to - from;
      for (const b of p.buckets) growTo(b, Math.floor((last - b.t0) / b.step) + 1);
      for (let v = 0; v < nv; v++) {
        const X = values[v];
        const F = flags[v];
        const fc = flagCounts[v]!;
        if (!X || !F) {
          fc[9]! += to - from;
          continue;
        }
        let c = count[v]!, k0 = shift[v]!, s1 = sum1[v]!, s2 = sum2[v]!, lo = min[v]!, hi = max[v]!;
        const mn1 = b1.min[v]!, mx1 = b1.max[v]!, sm1 = b1.sum[v]!, n1 = b1.n[v]!, w1 = b1.worst[v]!;
        // The current bucket and the pass count live in locals while rows stay in them (a minute holds 60 rows at
        // 1 Hz), so the loop does not go through memory for every row; same additions in the same order.
        let passed = 0;
        let j = -1, bMin = 0, bMax = 0, bSum = 0, bN = 0, bW = 0;
        for (let k = from; k < to; k++) {
          const i = idx[k]!;
          const f = F[i]!;
          if (f === 1) passed++;
          else fc[f]!++;
          const x = X[i]!;
          if (x !== x) continue;
          if (f <= 2) {
            if (c === 0) k0 = x;
            c++;
            const d = x - k0;
            s1 += d;
            s2 += d * d;
            if (x < lo) lo = x;
            if (x > hi) hi = x;
          }
          const j1 = bucketOf[k - from]!;
          if (j1 !== j) {
            if (j >= 0) putBucket(mn1, mx1, sm1, n1, w1, j, bMin, bMax, bSum, bN, bW);
            j = j1;
            bMin = mn1[j]!;
            bMax = mx1[j]!;
            bSum = sm1[j]!;
            bN = n1[j]!;
            bW = w1[j]!;
          }
          if (x < bMin) bMin = x;
          if (x > bMax) bMax = x;
          bSum += x;
          bN++;
          if (f > bW && f !== 9) bW = f;
        }
        if (j >= 0) putBucket(mn1, mx1, sm1, n1, w1, j, bMin, bMax, bSum, bN, bW);
        fc[1]! += passed;
        count[v] = c;
        shift[v] = k0;
        sum1[v] = s1;
        sum2[v] = s2;
        min[v] = lo;
        max[v] = hi;
      }
    },

    summary(): VersionSummaryData {
      const iso = (t: number) => (Number.isFinite(t) ? new Date(t * 1000).toISOString() : null);
      let rows = 0;
      let expected = 0;
      let start = Infinity;
      let end = -Infinity;
      const plats: VersionSummaryData["platforms"] = [];
      for (const [id, p] of platforms) {
        rows += p.rows;
        if (intervalS) expected += Math.round((p.last - p.first) / intervalS) + 1;
        start = Math.min(start, p.first);
        end = Math.max(end, p.last);
        plats.push({ id, rows: p.rows, start: iso(p.first), end: iso(p.last) });
      }
      const vars: VariableStats[] = variables.map((variable, v) => {
        const c = count[v]!;
        const fc = flagCounts[v]!;
        return {
          variable,
          unit: units[v]!,
          count: c,
          min: c ? min[v]! : null,
          max: c ? max[v]! : null,
          mean: c ? shift[v]! + sum1[v]! / c : null,
          std: c > 1 ? Math.sqrt(Math.max(0, sum2[v]! - (sum1[v]! * sum1[v]!) / c) / (c - 1)) : null,
          flags: Array.from(fc),
        };
      });
      gaps = gaps.sort((a, b) => b.to - b.from - (a.to - a.from));
      return {
        rows,
        platforms: plats,
        start: iso(start),
        end: iso(end),
        intervalS,
        gaps: gaps.map((g) => ({ platform: g.platform, from: iso(g.from)!, to: iso(g.to)!, seconds: g.to - g.from })),
        gapCount,
        coverage: intervalS && expected > 0 ? Math.min(1, rows / expected) : null,
        variables: vars,
      };
    },

    /** Plot bucket arrays per platform, variable and step (empty buckets: n 0, NaN min/max/mean, worst flag 9). */
    *plotSeries(): Generator<PlotSeriesRow> {
      for (const [platform, p] of platforms) {
        for (const b of [p.buckets[0]!, ...PLOT_STEPS_S.slice(1).map((s) => foldBuckets(p.buckets[0]!, s, nv))]) {
          for (let v = 0; v < nv; v++) {
            const len = b.len;
            const mn: number[] = new Array(len);
            const mx: number[] = new Array(len);
            const me: number[] = new Array(len);
            const nn: number[] = new Array(len);
            const wf: number[] = new Array(len);
            let any = false;
            for (let j = 0; j < len; j++) {
              const n = b.n[v]![j]!;
              nn[j] = n;
              if (n > 0) {
                any = true;
                mn[j] = b.min[v]![j]!;
                mx[j] = b.max[v]![j]!;
                me[j] = b.sum[v]![j]! / n;
                wf[j] = b.worst[v]![j]! || 9;
              } else {
                mn[j] = mx[j] = me[j] = NaN;
                wf[j] = 9;
              }
            }
            if (!any) continue;
            yield { platform, variable: variables[v]!, stepS: b.step, t0: b.t0, min: mn, max: mx, mean: me, n: nn, worstFlag: wf };
          }
        }
      }
    },
  };
}
export type Summariser = ReturnType<typeof createSummariser>;
