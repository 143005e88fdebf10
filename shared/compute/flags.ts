/**
 * QC flag codes (QARTOD flag manual = IODE primary levels): 1 pass, 2 not evaluated, 3 suspect, 4 fail, 9 missing.
 * Inside the engine a per-record working flag of 0 means "no test has run yet"; it becomes 2 when aggregated.
 */
export const FLAG = { PASS: 1, NOT_EVALUATED: 2, SUSPECT: 3, FAIL: 4, MISSING: 9 } as const;
/** An aggregate flag value. */
export type FlagValue = 1 | 2 | 3 | 4 | 9;

/** CF `flag_values` / `flag_meanings` for every `<name>_qc` column (CF 1.11 §3.5). */
export const flagValues = [1, 2, 3, 4, 9] as const;
/** CF `flag_meanings`, in the order of `flagValues`. */
export const flagMeanings = "pass not_evaluated suspect fail missing_data";

/**
 * One bit per QC test. A variable's `tests` word (Uint32Array per record) sets bit `t` when test t raised
 * suspect and bit `16 + t` when it raised fail, so a report can say which test flagged what. Bit 31 on a wind
 * direction marks calm wind (speed below the calm setting), the reason its flag is 2. Record-level tests (gap,
 * syntax) appear on every variable of the record; location and implied speed on latitude and longitude.
 */
export const TEST = {
  GAP: 0,
  SYNTAX: 1,
  LOCATION: 2,
  GROSS_RANGE: 3,
  CLIMATOLOGY: 4,
  SPIKE: 5,
  RATE_OF_CHANGE: 6,
  FLAT_LINE: 7,
  MULTI_VARIATE: 8,
  IMPLIED_SPEED: 9,
  ATTENUATED_SIGNAL: 10,
} as const;
/** Name of a QC test (key of TEST). */
export type TestName = keyof typeof TEST;
/** All QC test names in bit order. */
export const testNames = Object.keys(TEST) as TestName[];

/** CF-style snake_case name of each test, as used in reports and flag attributes. */
export const testLabels: Record<TestName, string> = {
  GAP: "gap",
  SYNTAX: "syntax",
  LOCATION: "location",
  GROSS_RANGE: "gross_range",
  CLIMATOLOGY: "climatology",
  SPIKE: "spike",
  RATE_OF_CHANGE: "rate_of_change",
  FLAT_LINE: "flat_line",
  MULTI_VARIATE: "multi_variate",
  IMPLIED_SPEED: "implied_speed",
  ATTENUATED_SIGNAL: "attenuated_signal",
};

/**
 * Ranking of a working flag for "worst of": 0 (nothing ran) < 1 pass < 3 suspect < 4 fail. A test that ran and
 * passed outranks "nothing ran", so aggregate 2 appears only when no test ran. O(1).
 */
export function worseTestFlag(a: number, b: number): number {
  return b > a ? b : a;
}

/** Aggregate flag of one value: 9 when missing, 2 when no test ran (working flag 0), else the worst flag. */
export function aggregateFlag(working: number, missing: boolean): FlagValue {
  if (missing) return 9;
  return (working === 0 ? 2 : working) as FlagValue;
}

/** Rank for combining aggregate flags of inputs into a derived value: 1 < 2 < 3 < 4 < 9. */
const derivedRank = new Uint8Array([0, 1, 2, 3, 4, 0, 0, 0, 0, 5, 0, 0, 0, 0, 0, 0]);

/** Worst of two aggregate flags for a derived value (a missing input makes the derived value missing). O(1). */
export function worseDerivedFlag(a: number, b: number): number {
  return derivedRank[b]! > derivedRank[a]! ? b : a;
}

/** Whether test `t` raised suspect (3) or fail (4) in a `tests` word. */
export function testRaised(word: number, t: number): 0 | 3 | 4 {
  if (word & (1 << (16 + t))) return 4;
  if (word & (1 << t)) return 3;
  return 0;
}

/**
 * `worseDerivedFlag` as a table: WORSE[(a << 4) | b] for aggregate flags a, b (both < 16). Hot loops index this
 * instead of calling a function. Built once at load.
 */
export const WORSE = new Uint8Array(256);
for (let a = 0; a < 16; a++) for (let b = 0; b < 16; b++) WORSE[(a << 4) | b] = worseDerivedFlag(a, b);
