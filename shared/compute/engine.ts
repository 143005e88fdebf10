import type { QcSettings, VariableQc } from "../schemas/qc-settings";
import { measuredVariables, type DerivedVariable, type MeasuredVariable } from "../vocabulary";
import type { RecordChunk } from "./canonical";
import { buildProvenance, computeDiagnostics as _computeDiagnostics, type DeploymentContext, type DiagnosticsPool, type Provenance } from "./diagnostics";
import { fromBearing as _fromBearing, windU as _windU, windV as _windV, currentU as _currentU, currentV as _currentV, wrap180 as _wrap180 } from "./directions";
import { FLAG, TEST, aggregateFlag as _aggregateFlag, WORSE as _WORSE } from "./flags";
import { haversine as _haversine, fixVelocity as _fixVelocity } from "./geodesy";
import { daysFromCivil as _daysFromCivil } from "./canonical";

// Module-level copies: hot loops then call plain locals rather than going through import bindings.
const { PASS, NOT_EVALUATED, SUSPECT, FAIL, MISSING } = FLAG;
const { GAP: T_GAP, SYNTAX: T_SYNTAX, LOCATION: T_LOCATION, GROSS_RANGE: T_GROSS_RANGE, CLIMATOLOGY: T_CLIMATOLOGY, SPIKE: T_SPIKE, RATE_OF_CHANGE: T_RATE_OF_CHANGE, FLAT_LINE: T_FLAT_LINE, MULTI_VARIATE: T_MULTI_VARIATE, IMPLIED_SPEED: T_IMPLIED_SPEED, ATTENUATED_SIGNAL: T_ATTENUATED_SIGNAL } = TEST;
const aggregateFlag = _aggregateFlag;
const W = _WORSE;
const fromBearing = _fromBearing;
const windU = _windU;
const windV = _windV;
const currentU = _currentU;
const currentV = _currentV;
const wrap180 = _wrap180;
const haversine = _haversine;
const fixVelocity = _fixVelocity;
const daysFromCivil = _daysFromCivil;
const computeDiagnostics = _computeDiagnostics;

/**
 * The streaming QC + diagnostics engine. Feed canonical chunks in file order with `push`, then call `finish`.
 * Each call returns the records whose flags are final, in input order. Window tests (spike, rate of change, flat
 * line, timing) and drifter legs carry their state per platform between chunks, so any split of the input gives
 * identical output. A spike verdict on a value needs the platform's next value, so a platform's latest record is
 * held back until that arrives (or until `finish`): for a file that interleaves platforms or holds one, the lag is
 * a record or so; a file sorted platform by platform holds the tail of each platform block until the next record
 * of that platform or the end.
 */
export interface Engine {
  push(chunk: RecordChunk): EngineBlock;
  finish(): EngineBlock;
  /** Counts so far (complete after `finish`). */
  summary(): RunSummary;
  readonly provenance: Provenance;
  /** Measured variables the engine evaluates (those in the map, plus wind components it fills in). */
  readonly variables: MeasuredVariable[];
  /** Derived variables every block will carry, in output order. */
  readonly derivedVariables: DerivedVariable[];
}

/** Final results for a run of records. Arrays are fresh copies owned by the caller. */
export interface EngineBlock {
  /** Index of the first record since the start of the run. */
  start: number;
  n: number;
  time: Float64Array;
  platform: Int32Array | null;
  line: Float64Array;
  values: Partial<Record<MeasuredVariable, Float64Array>>;
  /** Aggregate flag per record: 1, 2, 3, 4 or 9. */
  flags: Partial<Record<MeasuredVariable, Uint8Array>>;
  /** Which tests raised the flag: bit t = suspect, bit 16+t = fail, for t in flags.ts TEST. */
  tests: Partial<Record<MeasuredVariable, Uint32Array>>;
  derived: Partial<Record<DerivedVariable, Float64Array>>;
  derivedFlags: Partial<Record<DerivedVariable, Uint8Array>>;
}

/** Counts over a whole run, for reports: rows, time span, flags per variable and per test. */
export interface RunSummary {
  rows: number;
  timeMin: number;
  timeMax: number;
  platforms: number;
  /** Per variable: count of each aggregate flag value (index = flag). */
  flagCounts: Partial<Record<MeasuredVariable | DerivedVariable, number[]>>;
  /** Per variable: per test name, [suspect, fail] counts. */
  testCounts: Partial<Record<MeasuredVariable, Record<string, [number, number]>>>;
  /** Reasons for "not evaluated" results, with counts. */
  notes: Record<string, number>;
}

/** How many QC tests have a bit (suspect bits 0–15, fail bits 16–31 of a tests word). */
const N_TESTS = Object.keys(TEST).length;
/** Every test's suspect and fail bits (not the calm bit). */
const TEST_BITS = ((1 << N_TESTS) - 1) * 0x10001;
const SUSPECT_BIT = (t: number) => 1 << t;
const FAIL_BIT = (t: number) => 1 << (16 + t);
/** Set on a wind direction word when the wind is calm: the direction is undefined and flagged 2. */
export const CALM_BIT = 1 << 31;

interface VarState {
  // spike
  p1: number;
  p2: number;
  p1Idx: number;
  nPrev: number;
  // rate of change: ring of (time, value − ref) over the trailing window
  rocT: Float64Array;
  rocV: Float64Array;
  rocHead: number;
  rocSize: number;
  rocSum: number;
  rocSq: number;
  ref: number;
  prev: number;
  // flat line: extremes of the last S and the last F values before the current one
  flat: FlatWindows | null;
  // attenuated signal: range and count of the values of the trailing window
  att: TimeWindowRange | null;
}

/**
 * Records the flat-line test looks back over: the settings' counts, or as many records as the `…AfterS` durations
 * hold at the expected interval when that is more (the handbook's counts are for hourly data). Also used to size
 * the context a build reads before an append's first record.
 */
export function flatLineCounts(f: NonNullable<VariableQc["flatLine"]>, intervalS: number | null): { suspect: number; fail: number } {
  const dt = intervalS !== null && intervalS > 0 ? intervalS : NaN;
  const byTime = (s: number | null | undefined) => (s && dt === dt ? Math.ceil(s / dt - 1e-9) : 0);
  return { suspect: Math.max(f.suspectCount, byTime(f.suspectAfterS)), fail: Math.max(f.failCount, byTime(f.failAfterS)) };
}

/**
 * The extremes of the last `s` and of the last `f` values pushed (s ≤ f), for the flat-line test: one monotonic deque
 * for the largest and one for the smallest over the longer window, O(1) amortised per value, so a window of hours at
 * 1 Hz costs no more per record than one of three values. The shorter window's deque is a suffix of the longer
 * one's (an element is kept while nothing later is at least as large), so a second cursor into the same deque
 * gives its extreme. Positions are logical (ever-increasing); the ring index is the position masked to a power of 2.
 */
export class FlatWindows {
  /** Largest of the windows, and largest of the negated values (the smallest, turned round). */
  private readonly hi: WindowMax;
  private readonly lo: WindowMax;
  /** Values pushed so far. */
  seen = 0;

  constructor(
    readonly s: number,
    readonly f: number,
  ) {
    this.hi = new WindowMax(s, f);
    this.lo = new WindowMax(s, f);
  }

  /** 4 when the last `f` values are all within `eps` of `x`, 3 when the last `s` are, else 1 (call once `seen ≥ s`). */
  flag(x: number, eps: number): number {
    if (this.seen >= this.f && this.hi.long() - x <= eps && x + this.lo.long() <= eps) return 4;
    return this.hi.short() - x <= eps && x + this.lo.short() <= eps ? 3 : 1;
  }

  push(x: number): void {
    const seq = this.seen++;
    this.hi.push(seq, x);
    this.lo.push(seq, -x);
  }
}

/**
 * Range (largest − smallest) and count of the values pushed within the last `windowS` seconds, times
 * (t − windowS, t] for the latest time t, for the attenuated-signal test. Monotonic deques of (time, value) for
 * the largest and the smallest and a FIFO of times for the count: O(1) amortised per value however long the window.
 * Times must not decrease.
 */
export class TimeWindowRange {
  private readonly times = new Ring();
  private readonly hi = new Ring();
  private readonly lo = new Ring();

  constructor(readonly windowS: number) {}

  get count(): number {
    return this.times.size;
  }

  /** Time of the oldest value still in the window (NaN when empty). */
  oldest(): number {
    return this.times.size ? this.times.frontT() : NaN;
  }

  /** Largest minus smallest of the window's values (NaN when empty). */
  range(): number {
    return this.hi.size ? this.hi.frontV() - this.lo.frontV() : NaN;
  }

  push(t: number, x: number): void {
    const cut = t - this.windowS;
    const { times, hi, lo } = this;
    while (times.size && times.frontT() <= cut) times.shift();
    while (hi.size && hi.frontT() <= cut) hi.shift();
    while (lo.size && lo.frontT() <= cut) lo.shift();
    times.push(t, 0);
    while (hi.size && hi.backV() <= x) hi.pop();
    hi.push(t, x);
    while (lo.size && lo.backV() >= x) lo.pop();
    lo.push(t, x);
  }
}

/** A double-ended ring of (time, value) pairs that doubles as needed. */
class Ring {
  private t = new Float64Array(16);
  private v = new Float64Array(16);
  private mask = 15;
  private head = 0;
  size = 0;

  frontT(): number {
    return this.t[this.head]!;
  }
  frontV(): number {
    return this.v[this.head]!;
  }
  backV(): number {
    return this.v[(this.head + this.size - 1) & this.mask]!;
  }
  shift(): void {
    this.head = (this.head + 1) & this.mask;
    this.size--;
  }
  pop(): void {
    this.size--;
  }
  push(t: number, x: number): void {
    if (this.size > this.mask) {
      const cap = (this.mask + 1) * 2;
      const nt = new Float64Array(cap);
      const nv = new Float64Array(cap);
      for (let j = 0; j < this.size; j++) {
        nt[j] = this.t[(this.head + j) & this.mask]!;
        nv[j] = this.v[(this.head + j) & this.mask]!;
      }
      this.t = nt;
      this.v = nv;
      this.mask = cap - 1;
      this.head = 0;
    }
    const k = (this.head + this.size) & this.mask;
    this.t[k] = t;
    this.v[k] = x;
    this.size++;
  }
}

/** Sliding maximum over the last `f` values and, by a second cursor into the same deque, over the last `s` ≤ `f`. */
class WindowMax {
  // Logical positions [head, end) in a ring that doubles as needed; mid = first position inside the shorter window.
  private mask = 15;
  private seq: Float64Array = new Float64Array(16);
  private val: Float64Array = new Float64Array(16);
  private head = 0;
  private end = 0;
  private mid = 0;

  constructor(
    private readonly s: number,
    private readonly f: number,
  ) {}

  long(): number {
    return this.val[this.head & this.mask]!;
  }

  short(): number {
    return this.val[this.mid & this.mask]!;
  }

  push(seq: number, x: number): void {
    let m = this.mask;
    // Drop from the back what x outranks, append x, drop from the front what left the windows.
    let end = this.end;
    while (end > this.head && this.val[(end - 1) & m]! <= x) end--;
    if (end - this.head > m) m = this.grow();
    this.seq[end & m] = seq;
    this.val[end & m] = x;
    if (this.mid > end) this.mid = end;
    this.end = end + 1;
    const cutF = seq - this.f + 1;
    const cutS = seq - this.s + 1;
    while (this.seq[this.head & m]! < cutF) this.head++;
    if (this.mid < this.head) this.mid = this.head;
    while (this.seq[this.mid & m]! < cutS) this.mid++;
  }

  /** Doubles the ring, keeping logical positions where they are; returns the new mask. */
  private grow(): number {
    const m = this.mask;
    const m2 = m * 2 + 1;
    const seq = new Float64Array(m2 + 1);
    const val = new Float64Array(m2 + 1);
    for (let p = this.head; p < this.end; p++) {
      seq[p & m2] = this.seq[p & m]!;
      val[p & m2] = this.val[p & m]!;
    }
    this.seq = seq;
    this.val = val;
    this.mask = m2;
    return m2;
  }
}

interface PlatformState {
  lastTime: number;
  /** Buffer index of the latest accepted record, waiting for the next; −1 when none. */
  pending: number;
  vars: (VarState | null)[];
  // positions for drifters
  fixIdx: number;
  fixLat: number;
  fixLon: number;
  fixTime: number;
  prevLat: number;
  prevLon: number;
  prevTime: number;
  prevLeg: number;
  // wind direction for the multi-variate step check
  lastDir: number;
}

function newVarState(q: VariableQc | undefined, flatK: { suspect: number; fail: number } | null): VarState {
  const cap = 16;
  return {
    p1: NaN, p2: NaN, p1Idx: -1, nPrev: 0,
    rocT: new Float64Array(q?.rateOfChange ? cap : 0), rocV: new Float64Array(q?.rateOfChange ? cap : 0),
    rocHead: 0, rocSize: 0, rocSum: 0, rocSq: 0, ref: NaN, prev: NaN,
    flat: flatK ? new FlatWindows(Math.min(flatK.suspect, flatK.fail), Math.max(flatK.suspect, flatK.fail)) : null,
    att: q?.attenuatedSignal ? new TimeWindowRange(q.attenuatedSignal.windowS) : null,
  };
}

/** Raises a working flag and records which test raised it (bit t for suspect, 16 + t for fail). */
function raiseAt(f: Uint8Array, t: Uint32Array, i: number, flag: number, test: number) {
  if (flag > f[i]!) f[i] = flag;
  if (flag === SUSPECT) t[i]! |= 1 << test;
  else if (flag === FAIL) t[i]! |= 1 << (16 + test);
}

/**
 * Spike, rate of change, flat line and attenuated signal for one variable over records [from, n). The per-platform
 * state lives in locals while a platform's run of records lasts and goes back to its VarState when the platform
 * changes, so the hot loop touches registers rather than objects. Records not accepted by the timing test are
 * skipped.
 */
function windowPass(
  X: Float64Array,
  time: Float64Array,
  acc: Uint8Array,
  plat: Int32Array,
  F: Uint8Array,
  T: Uint32Array,
  from: number,
  n: number,
  platforms: PlatformState[],
  k: number,
  q: VariableQc,
  flatK: { suspect: number; fail: number } | null,
) {
  const spike = q.spike;
  const roc = q.rateOfChange;
  const flat = q.flatLine;
  const spS = spike ? spike.suspect : 0, spF = spike ? spike.fail : 0;
  const rocN2 = roc ? roc.n * roc.n : 0, rocW = roc ? roc.windowS : 0, rocMin = roc ? roc.minCount : 0;
  const flEps = flat ? flat.epsilon : 0;
  // Settings may ask for fail before suspect: then the shorter window already fails.
  const failFirst = flatK !== null && flatK.fail <= flatK.suspect;
  const att = q.attenuatedSignal;
  const atSuspect = att ? att.suspectBelow : 0, atFail = att ? att.failBelow : 0, atMin = att ? att.minCount : 0, atHalf = att ? att.windowS / 2 : 0;
  let lastP = -1;
  let vs: VarState | null = null;
  let p1 = 0, p2 = 0, p1Idx = 0, nPrev = 0;
  let rocT: Float64Array = new Float64Array(0), rocV: Float64Array = new Float64Array(0);
  let head = 0, size = 0, sum = 0, sq = 0, ref = 0, prev = 0, cap = 0;
  let fw: FlatWindows | null = null;
  let aw: TimeWindowRange | null = null;
  for (let i = from; i < n; i++) {
    if (!acc[i]) continue;
    const p = plat[i]!;
    if (p !== lastP) {
      // No closure here: captured locals would live in a heap context instead of registers.
      if (vs) {
        vs.p1 = p1; vs.p2 = p2; vs.p1Idx = p1Idx; vs.nPrev = nPrev;
        vs.rocT = rocT; vs.rocV = rocV; vs.rocHead = head; vs.rocSize = size; vs.rocSum = sum; vs.rocSq = sq; vs.ref = ref; vs.prev = prev;
      }
      vs = platforms[p]!.vars[k]!;
      lastP = p;
      p1 = vs.p1; p2 = vs.p2; p1Idx = vs.p1Idx; nPrev = vs.nPrev;
      rocT = vs.rocT; rocV = vs.rocV; head = vs.rocHead; size = vs.rocSize; sum = vs.rocSum; sq = vs.rocSq; ref = vs.ref; prev = vs.prev; cap = rocT.length;
      fw = vs.flat;
      aw = vs.att;
    }
    const x = X[i]!;
    if (x !== x) {
      // A gap in the values breaks the spike triple.
      nPrev = 0;
      continue;
    }
    if (spike) {
      if (nPrev >= 2) {
        const d = Math.abs(p1 - (p2 + x) / 2);
        raiseAt(F, T, p1Idx, d >= spF ? FAIL : d >= spS ? SUSPECT : PASS, T_SPIKE);
      }
      p2 = p1;
      p1 = x;
      p1Idx = i;
      if (nPrev < 2) nPrev++;
    }
    if (roc) {
      const t = time[i]!;
      if (ref !== ref) ref = x;
      // Drop values that left the trailing window.
      const lim = t - rocW;
      while (size > 0 && rocT[head]! <= lim) {
        const y = rocV[head]!;
        sum -= y;
        sq -= y * y;
        head = head + 1 === cap ? 0 : head + 1;
        size--;
      }
      if (size >= rocMin && prev === prev) {
        // |Δ| > N·σ, squared and multiplied through by size² so no division or root is needed:
        // Δ²·size² > N²·(size·Σy² − (Σy)²), with a negative rounding residue treated as zero variance.
        const d = x - prev;
        const v = size * sq - sum * sum;
        raiseAt(F, T, i, d * d * size * size > rocN2 * (v > 0 ? v : 0) && d !== 0 ? SUSPECT : PASS, T_RATE_OF_CHANGE);
      }
      if (size === cap) {
        // Grow the ring, unrolling it so the oldest value comes first.
        const c2 = Math.max(16, cap * 2);
        const nt = new Float64Array(c2);
        const nvv = new Float64Array(c2);
        for (let j = 0; j < size; j++) {
          const s = (head + j) % cap;
          nt[j] = rocT[s]!;
          nvv[j] = rocV[s]!;
        }
        rocT = nt;
        rocV = nvv;
        head = 0;
        cap = c2;
      }
      // Values are kept relative to the series' first value so the running sums stay well conditioned.
      const y = x - ref;
      let tail = head + size;
      if (tail >= cap) tail -= cap;
      rocT[tail] = t;
      rocV[tail] = y;
      size++;
      sum += y;
      sq += y * y;
      prev = x;
    }
    if (fw) {
      // The last S (F) values before this one all within epsilon of it → suspect (fail).
      if (fw.seen >= fw.s) {
        const r = fw.flag(x, flEps);
        raiseAt(F, T, i, failFirst && r !== PASS ? FAIL : r, T_FLAT_LINE);
      }
      fw.push(x);
    }
    if (aw) {
      // The range of the trailing window's values (this one included) below a floor → fail, or suspect.
      const t = time[i]!;
      aw.push(t, x);
      // Judged once the window is at least half covered, so the first minutes of a series or of the data after a
      // gap are not taken for a dead sensor.
      if (aw.count >= atMin && t - aw.oldest() >= atHalf) {
        const r = aw.range();
        raiseAt(F, T, i, r < atFail ? FAIL : r < atSuspect ? SUSPECT : PASS, T_ATTENUATED_SIGNAL);
      }
    }
  }
  if (vs) {
    vs.p1 = p1; vs.p2 = p2; vs.p1Idx = p1Idx; vs.nPrev = nPrev;
        vs.rocT = rocT; vs.rocV = rocV; vs.rocHead = head; vs.rocSize = size; vs.rocSum = sum; vs.rocSq = sq; vs.ref = ref; vs.prev = prev;
  }
}

/** Grows a typed array, keeping the first `keep` items. */
function grow<T extends Float64Array | Uint8Array | Uint32Array | Int32Array>(a: T, cap: number, keep: number): T {
  const b = new (a.constructor as new (n: number) => T)(cap);
  b.set(a.subarray(0, keep) as never);
  return b;
}

/** How the engine hands out results. */
export interface EngineOptions {
  /**
   * Reuse the arrays of returned blocks: each block is then valid only until the next `push`/`finish`. For
   * streaming callers that write a block out before pushing more (saves allocation and garbage collection).
   */
  reuseBlocks?: boolean;
}

/**
 * Creates an engine for one deployment (or one fleet file). `variables` are the measured variables the input
 * chunks will carry (e.g. `canonicalizer.variables`). Values are in canonical units (shared/vocabulary.ts); NaN
 * means no value (flag 9) unless the chunk marks the field unreadable (flag 4). Cost per record O(variables), plus
 * O(window) memory per variable and platform for the rate-of-change window, and a short iteration per record for
 * the neutral wind. Push chunks of a few thousand records (`sliceChunk`, `ENGINE_SLICE`) for speed.
 */
export function createEngine(settings: QcSettings, ctx: DeploymentContext, inputVariables: readonly MeasuredVariable[], options: EngineOptions = {}): Engine {
  const reuse = options.reuseBlocks === true;
  const diagPool: DiagnosticsPool | undefined = reuse ? new Map() : undefined;
  const outPool = new Map<string, Float64Array | Uint8Array | Uint32Array | Int32Array>();
  /** A copy of src[0..m) in a fresh array, or in a pooled one when reusing. */
  const take = <T extends Float64Array | Uint8Array | Uint32Array | Int32Array>(key: string, src: T, m: number): T => {
    if (!reuse) return src.slice(0, m) as T;
    let a = outPool.get(key) as T | undefined;
    if (!a || a.length < m) {
      a = new (src.constructor as new (k: number) => T)(Math.max(m, 1024));
      outPool.set(key, a);
    }
    const v = a.subarray(0, m) as T;
    v.set(src.subarray(0, m) as never);
    return v;
  };
  const fresh = <T extends Float64Array | Uint8Array | Uint32Array>(key: string, ctor: new (k: number) => T, m: number): T => {
    if (!reuse) return new ctor(m);
    let a = outPool.get(key) as T | undefined;
    if (!a || a.length < m) {
      a = new ctor(Math.max(m, 1024));
      outPool.set(key, a);
    }
    return a.subarray(0, m) as T;
  };
  const present = new Set(inputVariables);
  // Fill the other wind and current representation so QC and diagnostics see both.
  const fillWindUV = present.has("wind_speed") && present.has("wind_from_direction") && !(present.has("eastward_wind") && present.has("northward_wind"));
  const fillWindSD = !fillWindUV && present.has("eastward_wind") && present.has("northward_wind") && !present.has("wind_speed");
  const fillCurUV = present.has("sea_water_speed") && present.has("sea_water_velocity_to_direction") && !(present.has("eastward_sea_water_velocity") && present.has("northward_sea_water_velocity"));
  if (fillWindUV) present.add("eastward_wind").add("northward_wind");
  if (fillWindSD) present.add("wind_speed").add("wind_from_direction");
  if (fillCurUV) present.add("eastward_sea_water_velocity").add("northward_sea_water_velocity");
  const vars = measuredVariables.filter((v) => present.has(v));
  const nv = vars.length;
  // A variable the engine filled from another pair is not tested itself: it takes the worst flag of its sources.
  const filledFrom: ([number, number] | null)[] = vars.map(() => null);
  const setFilled = (a: MeasuredVariable, b: MeasuredVariable, s1: MeasuredVariable, s2: MeasuredVariable) => {
    const src: [number, number] = [vars.indexOf(s1), vars.indexOf(s2)];
    filledFrom[vars.indexOf(a)] = src;
    filledFrom[vars.indexOf(b)] = src;
  };
  if (fillWindUV) setFilled("eastward_wind", "northward_wind", "wind_speed", "wind_from_direction");
  if (fillWindSD) setFilled("wind_speed", "wind_from_direction", "eastward_wind", "northward_wind");
  if (fillCurUV) setFilled("eastward_sea_water_velocity", "northward_sea_water_velocity", "sea_water_speed", "sea_water_velocity_to_direction");
  const qcs = vars.map((v) => settings.variables[v]);
  const flatKs = qcs.map((q) => (q?.flatLine ? flatLineCounts(q.flatLine, settings.timing.expectedIntervalS) : null));
  const hasPos = present.has("latitude") && present.has("longitude");
  const drifter = ctx.platformKind === "drifter" && hasPos;
  const needsLookahead = drifter || qcs.some((q) => q?.spike);
  const provenance = buildProvenance(settings, ctx);
  const iWs = vars.indexOf("wind_speed");
  const iWd = vars.indexOf("wind_from_direction");
  const iGust = vars.indexOf("wind_speed_of_gust");
  const iLat = vars.indexOf("latitude");
  const iLon = vars.indexOf("longitude");
  const timing = settings.timing;
  const maxGap = timing.expectedIntervalS === null ? Infinity : timing.expectedIntervalS * timing.gapFactor;
  const mv = settings.multiVariate;
  const watchR = settings.location.watchCircleM;
  const nomLat = ctx.latitude ?? NaN;
  const nomLon = ctx.longitude ?? NaN;

  // Working buffer: the records not yet emitted.
  let cap = 0;
  let n = 0;
  let time = new Float64Array(0);
  let plat = new Int32Array(0);
  let line = new Float64Array(0);
  let acc = new Uint8Array(0);
  let recFlag = new Uint8Array(0);
  let recTests = new Uint32Array(0);
  let posFlag = new Uint8Array(0);
  let posTests = new Uint32Array(0);
  let dU = new Float64Array(0);
  let dV = new Float64Array(0);
  let dS = new Float64Array(0);
  const val: Float64Array[] = vars.map(() => new Float64Array(0));
  const flg: Uint8Array[] = vars.map(() => new Uint8Array(0));
  const tst: Uint32Array[] = vars.map(() => new Uint32Array(0));
  const bad: Uint8Array[] = vars.map(() => new Uint8Array(0));
  let hasPlatform = false;
  let emitted = 0;

  const platforms: PlatformState[] = [];
  const platformState = (p: number): PlatformState => {
    let s = platforms[p];
    if (!s) {
      s = {
        lastTime: NaN, pending: -1, vars: qcs.map((q, k) => newVarState(q, flatKs[k]!)),
        fixIdx: -1, fixLat: NaN, fixLon: NaN, fixTime: NaN, prevLat: NaN, prevLon: NaN, prevTime: NaN, prevLeg: NaN,
        lastDir: NaN,
      };
      platforms[p] = s;
    }
    return s;
  };

  const summary: RunSummary = { rows: 0, timeMin: Infinity, timeMax: -Infinity, platforms: 0, flagCounts: {}, testCounts: {}, notes: {} };

  function ensure(extra: number) {
    if (n + extra <= cap) return;
    cap = Math.max(n + extra, cap * 2, 1024);
    time = grow(time, cap, n);
    plat = grow(plat, cap, n);
    line = grow(line, cap, n);
    acc = grow(acc, cap, n);
    recFlag = grow(recFlag, cap, n);
    recTests = grow(recTests, cap, n);
    posFlag = grow(posFlag, cap, n);
    posTests = grow(posTests, cap, n);
    dU = grow(dU, cap, n);
    dV = grow(dV, cap, n);
    dS = grow(dS, cap, n);
    for (let k = 0; k < nv; k++) {
      val[k] = grow(val[k]!, cap, n);
      flg[k] = grow(flg[k]!, cap, n);
      tst[k] = grow(tst[k]!, cap, n);
      bad[k] = grow(bad[k]!, cap, n);
    }
  }

  function raise(f: Uint8Array, t: Uint32Array, i: number, flag: number, test: number) {
    if (flag > f[i]!) f[i] = flag;
    if (flag === SUSPECT) t[i]! |= SUSPECT_BIT(test);
    else if (flag === FAIL) t[i]! |= FAIL_BIT(test);
  }

  function append(c: RecordChunk) {
    ensure(c.n);
    const from = n;
    time.set(c.time, from);
    line.set(c.line, from);
    if (c.platform) {
      plat.set(c.platform, from);
      hasPlatform = true;
    } else plat.fill(0, from, from + c.n);
    recFlag.fill(0, from, from + c.n);
    recTests.fill(0, from, from + c.n);
    posFlag.fill(0, from, from + c.n);
    posTests.fill(0, from, from + c.n);
    dU.fill(NaN, from, from + c.n);
    dV.fill(NaN, from, from + c.n);
    dS.fill(NaN, from, from + c.n);
    for (let k = 0; k < nv; k++) {
      const src = c.values[vars[k]!];
      if (src) val[k]!.set(src, from);
      else val[k]!.fill(NaN, from, from + c.n);
      const b = c.bad[vars[k]!];
      if (b) bad[k]!.set(b, from);
      else bad[k]!.fill(0, from, from + c.n);
      flg[k]!.fill(0, from, from + c.n);
      tst[k]!.fill(0, from, from + c.n);
    }
    const end = from + c.n;
    const fillPair = (s: number, d: number, a: number, b: number, wind: boolean) => {
      const S = val[s]!, D = val[d]!, A = val[a]!, B = val[b]!;
      for (let i = from; i < end; i++) {
        A[i] = wind ? windU(S[i]!, D[i]!) : currentU(S[i]!, D[i]!);
        B[i] = wind ? windV(S[i]!, D[i]!) : currentV(S[i]!, D[i]!);
        const bb = bad[s]![i]! | bad[d]![i]!;
        bad[a]![i] = bb;
        bad[b]![i] = bb;
      }
    };
    if (fillWindUV) fillPair(iWs, iWd, vars.indexOf("eastward_wind"), vars.indexOf("northward_wind"), true);
    if (fillCurUV)
      fillPair(vars.indexOf("sea_water_speed"), vars.indexOf("sea_water_velocity_to_direction"), vars.indexOf("eastward_sea_water_velocity"), vars.indexOf("northward_sea_water_velocity"), false);
    if (fillWindSD) {
      const U = val[vars.indexOf("eastward_wind")]!, Vv = val[vars.indexOf("northward_wind")]!;
      for (let i = from; i < end; i++) {
        val[iWs]![i] = Math.sqrt(U[i]! * U[i]! + Vv[i]! * Vv[i]!);
        val[iWd]![i] = fromBearing(U[i]!, Vv[i]!);
      }
    }
    n = end;
    return from;
  }

  /** Timing, syntax, location and drifter legs; marks which records feed the window tests. */
  function recordTests(from: number) {
    const lat = iLat >= 0 ? val[iLat]! : null;
    const lon = iLon >= 0 ? val[iLon]! : null;
    let lastP = -1;
    let lastSt: PlatformState = null as unknown as PlatformState;
    for (let i = from; i < n; i++) {
      const t = time[i]!;
      if (recordBadMask[i - from] || !Number.isFinite(t)) {
        raise(recFlag, recTests, i, FAIL, T_SYNTAX);
        acc[i] = 0;
        continue;
      }
      recFlag[i] = PASS; // syntax ran and passed
      const st = plat[i] === lastP ? lastSt : ((lastP = plat[i]!), (lastSt = platformState(lastP)));
      const last = st.lastTime;
      if (last === last && t <= last) {
        raise(recFlag, recTests, i, FAIL, T_GAP);
        acc[i] = 0;
        continue;
      }
      if (last === last && t - last > maxGap) raise(recFlag, recTests, i, timing.gapFlag, T_GAP);
      st.lastTime = t;
      acc[i] = 1;
      if (lat && lon) {
        const la = lat[i]!;
        const lo = lon[i]!;
        if (la === la && lo === lo) {
          if (Math.abs(la) > 90 || Math.abs(lo) > 180) {
            raise(posFlag, posTests, i, FAIL, T_LOCATION);
          } else {
            let pf: number = PASS;
            if (watchR !== null && nomLat === nomLat && haversine(nomLat, nomLon, la, lo) > watchR) pf = SUSPECT;
            raise(posFlag, posTests, i, pf, T_LOCATION);
            if (drifter) driftLeg(st, i, la, lo, t);
          }
        }
      }
    }
  }

  /** A new fix closes the leg from the previous one: judge the previous fix and give it a velocity. */
  function driftLeg(st: PlatformState, i: number, la: number, lo: number, t: number) {
    if (st.fixTime === st.fixTime) {
      const leg = haversine(st.fixLat, st.fixLon, la, lo) / (t - st.fixTime);
      if (st.fixIdx >= 0) resolveFix(st, st.fixIdx, leg, la, lo, t);
      st.prevLeg = leg;
    }
    st.prevLat = st.fixLat;
    st.prevLon = st.fixLon;
    st.prevTime = st.fixTime;
    st.fixLat = la;
    st.fixLon = lo;
    st.fixTime = t;
    st.fixIdx = i;
  }

  /** Implied-speed verdict and centred velocity for the fix at buffer index k; `next*` NaN at the series end. */
  function resolveFix(st: PlatformState, k: number, nextLeg: number, nla: number, nlo: number, nt: number) {
    const prevLeg = st.prevLeg;
    const sq = settings.impliedSpeed;
    let f: number = PASS;
    if (prevLeg === prevLeg && nextLeg === nextLeg) {
      // The bad fix is the one whose legs are both fast.
      const slow = Math.min(prevLeg, nextLeg);
      f = slow > sq.fail ? FAIL : slow > sq.suspect ? SUSPECT : PASS;
    } else {
      // One leg only (series end): a fast leg cannot say which end is wrong, so at most suspect.
      const one = prevLeg === prevLeg ? prevLeg : nextLeg;
      if (one !== one) f = 0;
      else f = one > sq.suspect ? SUSPECT : PASS;
    }
    if (f) raise(posFlag, posTests, k, f, T_IMPLIED_SPEED);
    const hasPrev = st.prevTime === st.prevTime;
    const hasNext = nt === nt;
    let r: [number, number, number] = [NaN, NaN, NaN];
    if (hasPrev && hasNext) r = fixVelocity(st.prevLat, st.prevLon, nla, nlo, nt - st.prevTime);
    else if (hasNext) r = fixVelocity(st.fixLat, st.fixLon, nla, nlo, nt - st.fixTime);
    else if (hasPrev) r = fixVelocity(st.prevLat, st.prevLon, st.fixLat, st.fixLon, st.fixTime - st.prevTime);
    dU[k] = r[0];
    dV[k] = r[1];
    dS[k] = r[2];
  }

  let recordBadMask: Uint8Array = new Uint8Array(0);
  // Month bounds cache for climatology.
  let monthStart = Infinity;
  let monthEnd = -Infinity;
  let month = 0;
  const monthOf = (t: number) => {
    if (t >= monthStart && t < monthEnd) return month;
    const dt = new Date(t * 1000);
    const y = dt.getUTCFullYear();
    month = dt.getUTCMonth();
    monthStart = daysFromCivil(y, month + 1, 1) * 86400;
    monthEnd = month === 11 ? daysFromCivil(y + 1, 1, 1) * 86400 : daysFromCivil(y, month + 2, 1) * 86400;
    return month;
  };

  function variableTests(from: number) {
    for (let k = 0; k < nv; k++) {
      if (filledFrom[k]) continue;
      const q = qcs[k];
      const X = val[k]!;
      const F = flg[k]!;
      const T = tst[k]!;
      const B = bad[k]!;
      const sensor = q?.sensor ?? null;
      const user = q?.user ?? null;
      const sMin = sensor?.min ?? -Infinity, sMax = sensor?.max ?? Infinity;
      const uMin = user?.min ?? -Infinity, uMax = user?.max ?? Infinity;
      const clim = q?.climatology ?? null;
      // Tests without state: syntax of the field, gross range, climatology.
      const TM = time;
      const ranged = sensor !== null || user !== null;
      for (let i = from, end = n; i < end; i++) {
        const x = X[i]!;
        if (x !== x) {
          if (B[i]) raiseAt(F, T, i, FAIL, T_SYNTAX);
          continue;
        }
        if (ranged) raiseAt(F, T, i, x < sMin || x > sMax ? FAIL : x < uMin || x > uMax ? SUSPECT : PASS, T_GROSS_RANGE);
        if (clim && TM[i] === TM[i]) {
          const m = monthOf(TM[i]!);
          raiseAt(F, T, i, x < clim.min[m]! || x > clim.max[m]! ? SUSPECT : PASS, T_CLIMATOLOGY);
        }
      }
      if (q && (q.spike || q.rateOfChange || q.flatLine || q.attenuatedSignal)) windowPass(X, time, acc, plat, F, T, from, n, platforms, k, q, flatKs[k]!);
    }
  }

  function multiVariate(from: number) {
    if (iWs < 0) return;
    const S = val[iWs]!;
    if (iGust >= 0) {
      const G = val[iGust]!;
      for (let i = from; i < n; i++) {
        const g = G[i]!;
        const s = S[i]!;
        if (g === g && s === s) raise(flg[iGust]!, tst[iGust]!, i, g < s ? SUSPECT : PASS, T_MULTI_VARIATE);
      }
    }
    if (iWd >= 0) {
      const D = val[iWd]!;
      const F = flg[iWd]!;
      const T = tst[iWd]!;
      let lastP = -1;
      let lastSt: PlatformState = null as unknown as PlatformState;
      for (let i = from; i < n; i++) {
        const s = S[i]!;
        const d = D[i]!;
        if (s !== s || d !== d) continue;
        if (s < mv.calmSpeed) T[i]! |= CALM_BIT;
        if (!acc[i]) continue;
        const st = plat[i] === lastP ? lastSt : ((lastP = plat[i]!), (lastSt = platformState(lastP)));
        if (s < mv.lightSpeed && s >= mv.calmSpeed && st.lastDir === st.lastDir) {
          raise(F, T, i, Math.abs(wrap180(d - st.lastDir)) > mv.maxDirectionStepDeg ? SUSPECT : PASS, T_MULTI_VARIATE);
        }
        st.lastDir = d;
      }
    }
  }

  /** Marks the latest accepted record of each platform as pending (its spike/drifter verdict needs the next). */
  function updatePending(from: number) {
    if (!hasPlatform) {
      for (let i = n - 1; i >= from; i--) {
        if (acc[i]) {
          platformState(0).pending = i;
          break;
        }
      }
      return;
    }
    for (let i = from; i < n; i++) if (acc[i]) platformState(plat[i]!).pending = i;
  }

  function emit(upTo: number): EngineBlock {
    const m = upTo;
    const block: EngineBlock = {
      start: emitted,
      n: m,
      time: take("time", time, m),
      platform: hasPlatform ? take("platform", plat, m) : null,
      line: take("line", line, m),
      values: {},
      flags: {},
      tests: {},
      derived: {},
      derivedFlags: {},
    };
    const order = vars.map((_, k) => k).sort((a, b) => (filledFrom[a] ? 1 : 0) - (filledFrom[b] ? 1 : 0));
    for (const k of order) {
      const v = vars[k]!;
      const X = take(`v${k}`, val[k]!, m);
      const F = fresh(`f${k}`, Uint8Array, m);
      const T = fresh(`t${k}`, Uint32Array, m);
      const counts = flagCounts[k]!;
      const WF = flg[k]!;
      const TT = tst[k]!;
      const isPos = k === iLat || k === iLon;
      const isDir = k === iWd;
      const B = bad[k]!;
      const src = filledFrom[k];
      const FA = src ? block.flags[vars[src[0]]!]! : null;
      const FB = src ? block.flags[vars[src[1]]!]! : null;
      const TA = src ? block.tests[vars[src[0]]!]! : null;
      const TB = src ? block.tests[vars[src[1]]!]! : null;
      // Locals, not the closure's reassignable buffers, so the loops read registers.
      const RT = recTests, RF = recFlag, PF = posFlag, PT = posTests;
      const synFail = FAIL_BIT(T_SYNTAX);
      if (!src && !isPos && !isDir) {
        // The common case: a measured variable with only its own and the record's tests.
        for (let i = 0; i < m; i++) {
          let w = WF[i]!;
          const r = RF[i]!;
          if (r > w) w = r;
          const rt = RT[i]!;
          const word = TT[i]! | rt;
          const x = X[i]!;
          const a = x !== x && B[i] === 0 && (rt & synFail) === 0 ? MISSING : w === 0 ? NOT_EVALUATED : w;
          F[i] = a;
          T[i] = word;
          counts[a]++;
          if (word & TEST_BITS) countTests(k, word);
        }
      } else {
        for (let i = 0; i < m; i++) {
          let w = WF[i]!;
          let word = TT[i]! | RT[i]!;
          if (RF[i]! > w) w = RF[i]!;
          if (isPos) {
            if (PF[i]! > w) w = PF[i]!;
            word |= PT[i]!;
          }
          const x = X[i]!;
          let a: number;
          if (FA) {
            a = W[(FA[i]! << 4) | FB![i]!]!;
            word |= (TA![i]! | TB![i]!) & ~CALM_BIT;
            if (x !== x) a = MISSING;
            else if (WF[i]! > 0) a = W[(a << 4) | WF[i]!]!;
          } else {
            a = aggregateFlag(w, x !== x && !B[i] && !(RT[i]! & synFail));
          }
          if (isDir && word & CALM_BIT && a === PASS) a = NOT_EVALUATED;
          F[i] = a;
          T[i] = word;
          counts[a]++;
          if (word & TEST_BITS) countTests(k, word);
        }
      }
      block.values[v] = X;
      block.flags[v] = F;
      block.tests[v] = T;
    }
    let drift: { u: Float64Array; v: Float64Array; speed: Float64Array; flag: Uint8Array } | undefined;
    if (drifter) {
      const fl = fresh("driftFlag", Uint8Array, m);
      const lf = block.flags.latitude!;
      const of = block.flags.longitude!;
      const du = take("dU", dU, m);
      for (let i = 0; i < m; i++) fl[i] = du[i] === du[i] ? W[(lf[i]! << 4) | of[i]!] : MISSING;
      drift = { u: du, v: take("dV", dV, m), speed: take("dS", dS, m), flag: fl };
      block.derived.surface_eastward_sea_water_velocity = drift.u;
      block.derived.surface_northward_sea_water_velocity = drift.v;
      block.derived.platform_speed_wrt_ground = drift.speed;
      block.derivedFlags.surface_eastward_sea_water_velocity = fl;
      block.derivedFlags.surface_northward_sea_water_velocity = fl;
      block.derivedFlags.platform_speed_wrt_ground = fl;
    }
    const diag = computeDiagnostics({ n: m, values: block.values, flags: block.flags, drift }, settings, ctx, diagPool);
    Object.assign(block.derived, diag.values);
    Object.assign(block.derivedFlags, diag.flags);
    for (const [k, c] of Object.entries(diag.notes)) summary.notes[k] = (summary.notes[k] ?? 0) + c;
    tally(block);
    // Shift the held-back tail to the front.
    const rest = n - m;
    if (rest > 0) {
      for (const a of [time, line, acc, recFlag, recTests, posFlag, posTests, dU, dV, dS, plat] as (Float64Array | Uint8Array | Uint32Array | Int32Array)[]) a.copyWithin(0, m, n);
      for (let k = 0; k < nv; k++) {
        val[k]!.copyWithin(0, m, n);
        flg[k]!.copyWithin(0, m, n);
        tst[k]!.copyWithin(0, m, n);
        bad[k]!.copyWithin(0, m, n);
      }
    }
    for (const st of platforms) {
      if (!st) continue;
      st.pending = st.pending >= m ? st.pending - m : -1;
      st.fixIdx = st.fixIdx >= m ? st.fixIdx - m : -1;
      for (const vs of st.vars) if (vs) vs.p1Idx -= m;
    }
    n = rest;
    emitted += m;
    return block;
  }

  // Summary counts, kept as typed arrays while streaming and turned into plain objects by summary().
  const flagCounts = vars.map(() => new Float64Array(10));
  const testCountArr = vars.map(() => new Float64Array(64));
  const derivedCounts = new Map<string, Float64Array>();
  const countTests = (k: number, word: number) => {
    const c = testCountArr[k]!;
    for (let t = 0; t < N_TESTS; t++) {
      if (word & FAIL_BIT(t)) c[32 + t]++;
      else if (word & SUSPECT_BIT(t)) c[t]++;
    }
  };

  function tally(b: EngineBlock) {
    summary.rows += b.n;
    let lo = summary.timeMin;
    let hi = summary.timeMax;
    for (let i = 0; i < b.n; i++) {
      const t = b.time[i]!;
      if (t < lo) lo = t;
      if (t > hi) hi = t;
    }
    summary.timeMin = lo;
    summary.timeMax = hi;
    // Component pairs share one flag array: count each array once.
    const counted = new Map<Uint8Array, Uint32Array>();
    for (const [k, F] of Object.entries(b.derivedFlags)) {
      let c = derivedCounts.get(k);
      if (!c) derivedCounts.set(k, (c = new Float64Array(10)));
      let u = counted.get(F!);
      if (!u) {
        u = new Uint32Array(256);
        for (let i = 0; i < F!.length; i++) u[F![i]!]++;
        counted.set(F!, u);
      }
      for (let j = 0; j < 10; j++) c[j] += u[j]!;
    }
    summary.platforms = platforms.filter(Boolean).length;
  }

  function finalSummary(): RunSummary {
    summary.flagCounts = {};
    summary.testCounts = {};
    vars.forEach((v, k) => {
      summary.flagCounts[v] = Array.from(flagCounts[k]!);
      const tc: Record<string, [number, number]> = {};
      const c = testCountArr[k]!;
      for (const [name, t] of Object.entries(TEST)) if (c[t]! || c[32 + t]!) tc[name] = [c[t]!, c[32 + t]!];
      summary.testCounts[v] = tc;
    });
    for (const [k, c] of derivedCounts) summary.flagCounts[k as DerivedVariable] = Array.from(c);
    return summary;
  }

  function boundary(): number {
    if (!needsLookahead) return n;
    let b = n;
    for (const st of platforms) {
      if (!st) continue;
      if (st.pending >= 0 && st.pending < b) b = st.pending;
      if (st.fixIdx >= 0 && st.fixIdx < b) b = st.fixIdx;
    }
    return b;
  }

  // Which derived outputs these inputs give: run the diagnostics on zero records.
  const probe = computeDiagnostics(
    {
      n: 0,
      values: Object.fromEntries(vars.map((v) => [v, new Float64Array(0)])),
      flags: Object.fromEntries(vars.map((v) => [v, new Uint8Array(0)])),
      drift: drifter ? { u: new Float64Array(0), v: new Float64Array(0), speed: new Float64Array(0), flag: new Uint8Array(0) } : undefined,
    },
    settings,
    ctx,
  );
  const derivedVariables = [
    ...((drifter ? ["surface_eastward_sea_water_velocity", "surface_northward_sea_water_velocity", "platform_speed_wrt_ground"] : []) as DerivedVariable[]),
    ...(Object.keys(probe.values) as DerivedVariable[]),
  ];

  return {
    provenance,
    variables: vars,
    derivedVariables,
    push(chunk) {
      const from = append(chunk);
      recordBadMask = chunk.recordBad;
      recordTests(from);
      variableTests(from);
      multiVariate(from);
      updatePending(from);
      return emit(boundary());
    },
    finish() {
      // Close every open series: last fixes get their one-leg verdict; spikes at the end stay not evaluated.
      for (const st of platforms) {
        if (!st) continue;
        if (drifter && st.fixIdx >= 0) resolveFix(st, st.fixIdx, NaN, NaN, NaN, NaN);
        st.fixIdx = -1;
        st.pending = -1;
      }
      return emit(n);
    },
    summary: finalSummary,
  };
}

/** Convenience for small inputs and tests: runs one chunk through a fresh engine and joins the blocks. O(n). */
export function runEngine(settings: QcSettings, ctx: DeploymentContext, chunks: RecordChunk[], variables: readonly MeasuredVariable[]): { blocks: EngineBlock[]; summary: RunSummary; provenance: Provenance } {
  const e = createEngine(settings, ctx, variables);
  const blocks = chunks.map((c) => e.push(c));
  blocks.push(e.finish());
  return { blocks: blocks.filter((b) => b.n > 0), summary: e.summary(), provenance: e.provenance };
}

