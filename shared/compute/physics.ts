/**
 * Per-record air–sea formulas (DOMAIN.md §2–§8). Scalar, O(1), pure. Inputs in SI/canonical units; a NaN input
 * gives a NaN output unless stated otherwise. The column-wise loops in diagnostics.ts call these.
 */

/** Earth's rotation rate, rad s-1 (Groten 2004; the constant in TEOS-10 `gsw.f`). */
export const OMEGA = 7.292115e-5;
/** Mean Earth radius used for β and tangent planes, m (as `gsw.distance`). */
export const EARTH_RADIUS_M = 6_371_000;
/** von Kármán's constant (common practice). */
export const KAPPA = 0.4;
/** Gravity for Charnock roughness, m s-2 (as Smith 1988 is usually applied; from memory). */
export const GRAVITY = 9.81;
/** Dry-air gas constant, J kg-1 K-1 (from memory; ICAO uses 287.05287). */
export const R_DRY = 287.05;
/** Ratio of gas constants dry air / water vapour (from memory). */
export const EPSILON = 0.622;
/** Fixed seawater density when no TEOS-10 evaluation is done, kg m-3 (common practice). */
export const RHO_SEAWATER_FIXED = 1025;

const RAD = Math.PI / 180;

/** Coriolis parameter f = 2Ω sin φ, s-1, φ in degrees. */
export function coriolis(latDeg: number): number {
  return 2 * OMEGA * Math.sin(latDeg * RAD);
}

/** β = 2Ω cos φ / a, m-1 s-1, φ in degrees, a in m (default 6 371 000). */
export function beta(latDeg: number, radiusM: number = EARTH_RADIUS_M): number {
  return (2 * OMEGA * Math.cos(latDeg * RAD)) / radiusM;
}

/** Selectable neutral 10 m drag laws (DOMAIN §4). */
export const dragLaws = ["LP81", "T90", "LY04", "LY09", "YT96", "S88"] as const;
/** Name of a drag law. */
export type DragLaw = (typeof dragLaws)[number];

/** Published source of each drag law, recorded in provenance. */
export const dragLawSources: Record<DragLaw, string> = {
  LP81: "Large & Pond 1981, JPO 11, 324-336; held at 1.2e-3 below 4 m/s (common practice)",
  T90: "Trenberth, Large & Olson 1990, JPO 20, 1742",
  LY04: "Large & Yeager 2004, NCAR/TN-460+STR; wind floored at 0.5 m/s",
  LY09: "Large & Yeager 2009, Clim. Dyn. 33",
  YT96: "Yelland & Taylor 1996, JPO 26, 541-558; held at its 3 m/s value below 3 m/s",
  S88: "Smith 1988, JGR 93(C12): Charnock alpha 0.011 plus smooth-flow term, viscosity after Andreas 1989",
};

/** Kinematic viscosity of air, m2 s-1, T in °C (Andreas 1989; from memory). */
export function airViscosity(tC: number): number {
  return 1.326e-5 * (1 + 6.542e-3 * tC + 8.301e-6 * tC * tC - 4.84e-9 * tC * tC * tC);
}

/**
 * Smith 1988 neutral 10 m drag coefficient and roughness length by fixed-point iteration on u*.
 * U in m s-1 (floored at 0.1 so the smooth-flow term stays finite), T air in °C (15 when NaN).
 * Cost: up to 50 iterations, usually < 10.
 */
export function dragS88(u10: number, tC = 15): { cd: number; z0: number } {
  const cd = dragS88Cd(u10, tC);
  if (cd !== cd) return { cd: NaN, z0: NaN };
  return { cd, z0: 10 * Math.exp(-KAPPA / Math.sqrt(cd)) };
}

/** `dragS88`'s drag coefficient alone, without allocating, for per-record loops. Same iteration and limits. */
export function dragS88Cd(u10: number, tC = 15): number {
  if (u10 !== u10) return NaN;
  const U = u10 < 0.1 ? 0.1 : u10;
  const nu = airViscosity(tC !== tC ? 15 : tC);
  let cd = 1.2e-3;
  for (let k = 0; k < 50; k++) {
    const us = Math.sqrt(cd) * U;
    const z0 = (0.011 * us * us) / GRAVITY + (0.11 * nu) / us;
    const l = KAPPA / Math.log(10 / z0);
    const next = l * l;
    if (Math.abs(next - cd) < 1e-12) return next;
    cd = next;
  }
  return cd;
}

/**
 * Neutral 10 m drag coefficient (dimensionless) for wind speed U10N (m s-1) by a published law (DOMAIN §4).
 * Linear laws are extended above their stated upper limit by their own formula. NaN in → NaN out.
 * `tC` (air temperature, °C) is used only by S88.
 */
export function dragCoefficient(law: DragLaw, u: number, tC = 15): number {
  if (Number.isNaN(u)) return NaN;
  switch (law) {
    case "LP81":
      return u < 11 ? 1.2e-3 : (0.49 + 0.065 * u) * 1e-3;
    case "T90":
      if (u <= 1) return 2.18e-3;
      if (u <= 3) return (0.62 + 1.56 / u) * 1e-3;
      if (u < 10) return 1.14e-3;
      return (0.49 + 0.065 * u) * 1e-3;
    case "LY04": {
      const w = u < 0.5 ? 0.5 : u;
      return (2.7 / w + 0.142 + w / 13.09) * 1e-3;
    }
    case "LY09": {
      if (u >= 33) return 2.34e-3;
      const w = u < 0.5 ? 0.5 : u;
      const w2 = w * w;
      return (2.7 / w + 0.142 + w / 13.09 - 3.14807e-10 * w2 * w2 * w2) * 1e-3;
    }
    case "YT96": {
      const w = u < 3 ? 3 : u;
      return w < 6 ? (0.29 + 3.1 / w + 7.7 / (w * w)) * 1e-3 : (0.6 + 0.07 * w) * 1e-3;
    }
    case "S88":
      return dragS88Cd(u, tC);
  }
}

/**
 * The drag law as a plain function of (U10N in m s-1, air temperature in °C), chosen once so per-record loops do
 * not switch on the law's name. Same numbers as `dragCoefficient`.
 */
export function dragFunction(law: DragLaw): (u: number, tC: number) => number {
  switch (law) {
    case "LP81":
      return (u) => (u !== u ? NaN : u < 11 ? 1.2e-3 : (0.49 + 0.065 * u) * 1e-3);
    case "S88":
      return dragS88Cd;
    default:
      return (u, tC) => dragCoefficient(law, u, tC);
  }
}

/** Neutral-wind height adjustments (DOMAIN §3). */
export const neutralWindMethods = ["power", "log", "drag"] as const;
/** Name of a neutral-wind method: power law, log law, or iterative with the drag law. */
export type NeutralWindMethod = (typeof neutralWindMethods)[number];

/** Power-law U10 = Uz·(10/z)^p; p = 0.11 for near-neutral sea (Hsu, Meindl & Gilhousen 1994; from memory). */
export function u10Power(uz: number, zM: number, p = 0.11): number {
  return uz * Math.pow(10 / zM, p);
}

/** Log-law U10 = Uz·ln(10/z0)/ln(z/z0); z0 = 2e-4 m for open sea (WMO-No. 8; from memory). */
export function u10Log(uz: number, zM: number, z0 = 2e-4): number {
  return (uz * Math.log(10 / z0)) / Math.log(zM / z0);
}

/**
 * Iterative neutral U10 with a drag law: U10 ← Uz/(1 + (√Cd(U10)/κ)·ln(z/10)), from Uz until the change is
 * below 1e-6 m s-1 (how LP81 did it). Cost: up to 30 iterations, ~5 typical. NaN or z = 10 returns Uz.
 */
export function u10Drag(uz: number, zM: number, law: DragLaw, tC = 15): number {
  return u10DragWith(uz, Math.log(zM / 10) / KAPPA, dragFunction(law), tC);
}

/**
 * The iteration of `u10Drag` with ln(z/10)/κ and the drag function supplied, for per-record loops. lz = 0 (a 10 m
 * sensor) returns Uz. Cost: up to 30 iterations.
 */
export function u10DragWith(uz: number, lz: number, cdOf: (u: number, tC: number) => number, tC = 15): number {
  if (uz !== uz || lz === 0) return uz;
  let u = uz;
  for (let k = 0; k < 30; k++) {
    const next = uz / (1 + Math.sqrt(cdOf(u, tC)) * lz);
    if (Math.abs(next - u) < 1e-6) return next;
    u = next;
  }
  return u;
}

/** Saturation vapour pressure over water, Pa, T in °C (Bolton 1980; from memory). */
export function saturationVapourPressure(tC: number): number {
  return 611.2 * Math.exp((17.67 * tC) / (tC + 243.5));
}

/**
 * Moist-air density, kg m-3, from pressure (Pa), temperature (K) and relative humidity (fraction 0–1; NaN or
 * omitted means dry air) through the virtual temperature (DOMAIN §5).
 */
export function airDensity(pPa: number, tK: number, rh = 0): number {
  const r = Number.isNaN(rh) ? 0 : rh;
  const e = r * saturationVapourPressure(tK - 273.15);
  const q = (EPSILON * e) / (pPa - (1 - EPSILON) * e);
  const tv = tK * (1 + 0.6078 * q);
  return pPa / (R_DRY * tv);
}

/** Ekman volume transport per unit width, m2 s-1: U_E = τy/(ρf), V_E = −τx/(ρf). f = 0 gives ±Infinity: callers mask. */
export function ekmanTransport(taux: number, tauy: number, f: number, rho: number = RHO_SEAWATER_FIXED): [number, number] {
  return [tauy / (rho * f), -taux / (rho * f)];
}

/** Empirical Ekman depth D_E = c·U10/√sin|φ|, m (c = 7.6, Stewart 2008 eq. 9.16). */
export function ekmanDepthEmpirical(u10: number, latDeg: number, c = 7.6): number {
  return (c * u10) / Math.sqrt(Math.sin(Math.abs(latDeg) * RAD));
}

/** Constant-viscosity Ekman depth D_E = π·√(2A_z/|f|), m (Stewart 2008 eq. 9.15); A_z in m2 s-1. */
export function ekmanDepthTheoretical(az: number, f: number): number {
  return Math.PI * Math.sqrt((2 * az) / Math.abs(f));
}

/** Theoretical surface Ekman current speed V0 = |τ|/(ρ·√(|f|·A_z)), m s-1 (Stewart 2008 §9.2). */
export function ekmanSurfaceSpeed(tau: number, f: number, az: number, rho: number = RHO_SEAWATER_FIXED): number {
  return tau / (rho * Math.sqrt(Math.abs(f) * az));
}

/** Empirical surface Ekman current V0 = c·U10/√sin|φ|, m s-1 (c = 0.0127, Stewart 2008 eq. 9.14). */
export function ekmanSurfaceSpeedEmpirical(u10: number, latDeg: number, c = 0.0127): number {
  return (c * u10) / Math.sqrt(Math.sin(Math.abs(latDeg) * RAD));
}

/**
 * Coastal upwelling index, m3 s-1 per 100 m of coast: 100·(U_E sin θ_off + V_E cos θ_off), with θ_off the
 * bearing (degree true) of the normal from land to sea. Positive = offshore transport (DOMAIN §8).
 */
export function upwellingIndex(ue: number, ve: number, offshoreDeg: number): number {
  return 100 * (ue * Math.sin(offshoreDeg * RAD) + ve * Math.cos(offshoreDeg * RAD));
}

/** Seconds in a year of 365.25 days, for m/yr figures. */
export const SECONDS_PER_YEAR = 365.25 * 86400;

/**
 * Ekman pumping velocity, m s-1, positive upward: curl/(ρf) + β·τx/(ρf²) (DOMAIN §9). curl in N m-3, τx in Pa.
 */
export function ekmanPumping(curl: number, taux: number, latDeg: number, rho: number = RHO_SEAWATER_FIXED): number {
  const f = coriolis(latDeg);
  return curl / (rho * f) + (beta(latDeg) * taux) / (rho * f * f);
}

/** Sverdrup meridional transport per unit width V = curl/(ρβ), m2 s-1 (Sverdrup 1947). */
export function sverdrupTransport(curl: number, latDeg: number, rho: number = RHO_SEAWATER_FIXED): number {
  return curl / (rho * beta(latDeg));
}

/** Years for Ekman pumping at `wE` (m s-1) to move water through `depthM` metres. Infinity when wE = 0. */
export function pumpingTimeYears(depthM: number, wE: number): number {
  return depthM / (Math.abs(wE) * SECONDS_PER_YEAR);
}
