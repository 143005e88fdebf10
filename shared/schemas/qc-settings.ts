import { z } from "zod";
import "./messages";
import { measuredVariables, type MeasuredVariable } from "../vocabulary";
import { dragLaws, neutralWindMethods } from "../compute/physics";

/**
 * QC and diagnostics settings for one deployment: typed, versioned, every threshold overridable. Defaults follow
 * DOMAIN.md §11 ("starter ranges", common practice); where the handbook gives no number the default is marked
 * as Tauline's own choice. Stored with every QC run as its settings snapshot.
 */

const rangeSchema = z.object({ min: z.number().nullable(), max: z.number().nullable() });

const variableQcSchema = z.object({
  /** Outside → fail (4). Canonical units. */
  sensor: rangeSchema.nullable(),
  /** Outside → suspect (3). Canonical units. */
  user: rangeSchema.nullable(),
  /** Optional monthly bounds (January first), outside → suspect. */
  climatology: z.object({ min: z.array(z.number()).length(12), max: z.array(z.number()).length(12) }).nullable(),
  /** |V2 − (V1+V3)/2| ≥ suspect → 3, ≥ fail → 4, flagged on V2. */
  spike: z.object({ suspect: z.number().positive(), fail: z.number().positive() }).nullable(),
  /** |Vn − Vn−1| > n·σ of the values in the trailing window → 3; needs `minCount` values in the window. */
  rateOfChange: z.object({ n: z.number().positive(), windowS: z.number().positive(), minCount: z.number().int().min(2) }).nullable(),
  /**
   * The last K values all within epsilon of the current one → 3 (suspect) or 4 (fail). K is `suspectCount` (or
   * `failCount`) records, or as many records as `suspectAfterS` (`failAfterS`) seconds hold at the expected
   * interval when that is more: the handbook's counts are for hourly data, and at 1 Hz three equal readings are
   * ordinary (see `flatLineCounts` in shared/compute/engine.ts).
   */
  flatLine: z
    .object({
      epsilon: z.number().nonnegative(),
      suspectCount: z.number().int().min(1),
      failCount: z.number().int().min(1),
      suspectAfterS: z.number().positive().nullable().default(null),
      failAfterS: z.number().positive().nullable().default(null),
    })
    .nullable(),
  /**
   * Attenuated signal (QARTOD's suggested test, DOMAIN §11 #10): the range (largest − smallest) of the values in
   * the trailing `windowS` seconds, this one included, below `failBelow` → 4, below `suspectBelow` → 3; evaluated
   * once the window holds `minCount` values spanning at least half of it (so the start of a series or of the data
   * after a gap is not judged on a few minutes). Catches a sensor that fouls or ices and stops following the signal
   * without repeating one value exactly (which the flat-line test catches). Canonical units. Off by default: the
   * handbook gives no numbers, and a sensible floor depends on the site and the sensor.
   */
  attenuatedSignal: z
    .object({
      windowS: z.number().positive(),
      suspectBelow: z.number().nonnegative(),
      failBelow: z.number().nonnegative(),
      minCount: z.number().int().min(2),
    })
    .nullable()
    .default(null),
});
export type VariableQc = z.infer<typeof variableQcSchema>;

export const qcSettingsSchema = z.object({
  version: z.literal(1),
  timing: z.object({
    /** Nominal sampling interval, s; null leaves the gap test not evaluated. */
    expectedIntervalS: z.number().positive().nullable(),
    /** A step longer than factor × interval is a gap. */
    gapFactor: z.number().min(1),
    gapFlag: z.union([z.literal(3), z.literal(4)]),
  }),
  location: z.object({
    /** Mooring watch-circle radius, m, around the deployment's nominal position; null disables the check. */
    watchCircleM: z.number().positive().nullable(),
  }),
  variables: z.record(z.enum(measuredVariables), variableQcSchema),
  multiVariate: z.object({
    /** Below this wind speed (m s-1) the direction is undefined: its flag is 2. */
    calmSpeed: z.number().nonnegative(),
    /** Below this wind speed a direction step above `maxDirectionStepDeg` is suspect. */
    lightSpeed: z.number().nonnegative(),
    maxDirectionStepDeg: z.number().positive().max(180),
  }),
  impliedSpeed: z.object({ suspect: z.number().positive(), fail: z.number().positive() }),
  diagnostics: z.object({
    dragLaw: z.enum(dragLaws),
    neutralWind: z.object({ method: z.enum(neutralWindMethods), powerExponent: z.number().positive(), z0: z.number().positive() }),
    airDensity: z.discriminatedUnion("method", [
      z.object({ method: z.literal("fixed"), value: z.number().positive() }),
      z.object({ method: z.literal("ideal_gas") }),
    ]),
    seawaterDensity: z.number().positive(),
    /** f-divided diagnostics are masked (flag 2) for |lat| below this, degrees. */
    equatorCutoffDeg: z.number().min(0).max(30),
    /** Constant eddy viscosity A_z for theoretical Ekman depth and surface current, m2 s-1. */
    eddyViscosity: z.number().positive(),
    ekmanDepthCoefficient: z.number().positive(),
  }),
});
export type QcSettings = z.infer<typeof qcSettingsSchema>;

const none: VariableQc = { sensor: null, user: null, climatology: null, spike: null, rateOfChange: null, flatLine: null, attenuatedSignal: null };
const r = (min: number | null, max: number | null) => ({ min, max });
const roc = { n: 3, windowS: 25 * 3600, minCount: 3 }; // N = 3 over 25 h (DOMAIN §11, from memory)
const K0 = 273.15;
/**
 * Flat line: DOMAIN §11 gives K = 3 (suspect) and 5 (fail) for hourly wind, so the defaults hold for K hours at
 * any sampling rate (and at least K records); air temperature the same, SST 10 and 20.
 */
const flat = (epsilon: number, suspectCount: number, failCount: number) => ({ epsilon, suspectCount, failCount, suspectAfterS: suspectCount * 3600, failAfterS: failCount * 3600 });

/** Default per-variable QC, canonical units. Ranges from DOMAIN §11; spike sizes are Tauline's own choice. */
export const defaultVariableQc: Record<MeasuredVariable, VariableQc> = {
  latitude: none,
  longitude: none,
  wind_speed: { ...none, sensor: r(0, 60), user: r(0, 35), spike: { suspect: 8, fail: 15 }, rateOfChange: roc, flatLine: flat(0.05, 3, 5) },
  wind_from_direction: { ...none, sensor: r(0, 360), flatLine: flat(0.05, 3, 5) },
  eastward_wind: { ...none, sensor: r(-60, 60), user: r(-35, 35) },
  northward_wind: { ...none, sensor: r(-60, 60), user: r(-35, 35) },
  wind_speed_of_gust: { ...none, sensor: r(0, 60), user: r(0, 45) },
  air_temperature: { ...none, sensor: r(-60 + K0, 60 + K0), spike: { suspect: 3, fail: 6 }, rateOfChange: roc, flatLine: flat(0.01, 3, 5) },
  air_pressure: { ...none, sensor: r(85000, 109000), user: r(95000, 105000), spike: { suspect: 300, fail: 600 }, rateOfChange: roc },
  air_pressure_at_mean_sea_level: { ...none, sensor: r(85000, 109000), user: r(95000, 105000), spike: { suspect: 300, fail: 600 }, rateOfChange: roc },
  relative_humidity: { ...none, sensor: r(0, 1.03), user: r(0, 1), spike: { suspect: 0.15, fail: 0.3 }, rateOfChange: roc },
  // Suspect floor: the freezing point at SP 35, p 0, −1.9191 °C (DOMAIN §5, computed with python3-gsw 3.6.16).
  sea_surface_temperature: { ...none, sensor: r(-2.5 + K0, 40 + K0), user: r(-1.9191 + K0, null), spike: { suspect: 1, fail: 2 }, rateOfChange: roc, flatLine: flat(0.0001, 10, 20) },
  sea_water_temperature: { ...none, sensor: r(-2.5 + K0, 40 + K0), user: r(-1.9191 + K0, null), spike: { suspect: 1, fail: 2 }, rateOfChange: roc },
  sea_water_practical_salinity: { ...none, sensor: r(0, 42), user: r(2, 41), spike: { suspect: 0.5, fail: 1 } },
  eastward_sea_water_velocity: { ...none, sensor: r(-3, 3), user: r(-2.5, 2.5), spike: { suspect: 0.5, fail: 1 }, rateOfChange: roc },
  northward_sea_water_velocity: { ...none, sensor: r(-3, 3), user: r(-2.5, 2.5), spike: { suspect: 0.5, fail: 1 }, rateOfChange: roc },
  sea_water_speed: { ...none, sensor: r(0, 3), user: r(0, 2.5), spike: { suspect: 0.5, fail: 1 } },
  sea_water_velocity_to_direction: { ...none, sensor: r(0, 360) },
};

/** A fresh copy of the default settings (version 1). */
export function defaultQcSettings(): QcSettings {
  return {
    version: 1,
    timing: { expectedIntervalS: null, gapFactor: 2, gapFlag: 4 },
    location: { watchCircleM: null },
    variables: structuredClone(defaultVariableQc),
    multiVariate: { calmSpeed: 1, lightSpeed: 3, maxDirectionStepDeg: 90 },
    impliedSpeed: { suspect: 2, fail: 3 },
    diagnostics: {
      dragLaw: "LP81",
      neutralWind: { method: "drag", powerExponent: 0.11, z0: 2e-4 },
      airDensity: { method: "fixed", value: 1.225 },
      seawaterDensity: 1025,
      equatorCutoffDeg: 5,
      eddyViscosity: 0.05,
      ekmanDepthCoefficient: 7.6,
    },
  };
}

type DeepPartial<T> = T extends readonly unknown[] ? T : T extends object ? { [K in keyof T]?: DeepPartial<T[K]> | null } : T;
export type QcSettingsInput = DeepPartial<QcSettings>;

function merge(base: unknown, over: unknown): unknown {
  if (over === undefined) return base;
  if (over === null || typeof over !== "object" || Array.isArray(over) || base === null || typeof base !== "object") return over;
  const out: Record<string, unknown> = { ...(base as Record<string, unknown>) };
  for (const [k, val] of Object.entries(over as Record<string, unknown>)) out[k] = merge(out[k], val);
  return out;
}

/**
 * Deep-merges overrides into the defaults and validates. Returns zod's safeParse result, so bad settings come back
 * as issues rather than a throw. A `null` override switches a test off.
 */
export function resolveQcSettings(overrides: QcSettingsInput = {}) {
  return qcSettingsSchema.safeParse(merge(defaultQcSettings(), overrides));
}

/**
 * Setting paths in `overrides` that the settings do not have (a misspelt variable or threshold would otherwise be
 * dropped without a word), as dotted paths. A `null` override is allowed anywhere (it switches a test off).
 */
export function unknownSettingPaths(overrides: unknown, base: unknown = defaultQcSettings(), at = ""): string[] {
  if (overrides === null || typeof overrides !== "object" || Array.isArray(overrides)) return [];
  if (base === null || typeof base !== "object" || Array.isArray(base)) return [];
  const out: string[] = [];
  for (const [k, v] of Object.entries(overrides as Record<string, unknown>)) {
    const path = at ? `${at}.${k}` : k;
    if (!(k in (base as Record<string, unknown>))) out.push(path);
    else out.push(...unknownSettingPaths(v, (base as Record<string, unknown>)[k], path));
  }
  return out;
}

/** A deployment's QC settings: its stored overrides, and the settings its next build will use (defaults merged). */
export const deploymentQcSettingsSchema = z.object({
  deploymentId: z.string(),
  overrides: z.record(z.string(), z.unknown()),
  settings: qcSettingsSchema,
  defaults: qcSettingsSchema,
  updatedAt: z.string().nullable(),
  updatedByName: z.string().nullable(),
});
export type DeploymentQcSettings = z.infer<typeof deploymentQcSettingsSchema>;

/** Replaces a deployment's overrides ({} = back to the defaults). Checked by resolving them over the defaults. */
export const updateDeploymentQcSettingsInputSchema = z.object({ overrides: z.record(z.string(), z.unknown()) });
export type UpdateDeploymentQcSettingsInput = z.infer<typeof updateDeploymentQcSettingsInputSchema>;
