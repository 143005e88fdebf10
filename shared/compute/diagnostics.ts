import type { QcSettings } from "../schemas/qc-settings";
import type { DerivedVariable, MeasuredVariable } from "../vocabulary";
import { FLAG, WORSE as _WORSE } from "./flags";
import {
  airDensity as _airDensity,
  coriolis as _coriolis,
  beta as _beta,

  dragLawSources,
  EARTH_RADIUS_M,
  ekmanDepthEmpirical as _ekmanDepthEmpirical,
  ekmanDepthTheoretical as _ekmanDepthTheoretical,
  ekmanSurfaceSpeed as _ekmanSurfaceSpeed,
  KAPPA,
  OMEGA,
  u10DragWith as _u10DragWith,
  dragFunction,
  u10Log as _u10Log,
  u10Power as _u10Power,
} from "./physics";

// Module-level copies: hot loops then call plain locals rather than going through import bindings.
const { PASS, NOT_EVALUATED, SUSPECT, MISSING } = FLAG;
const W = _WORSE;
const airDensity = _airDensity;
const coriolis = _coriolis;
const beta = _beta;
const ekmanDepthEmpirical = _ekmanDepthEmpirical;
const ekmanDepthTheoretical = _ekmanDepthTheoretical;
const ekmanSurfaceSpeed = _ekmanSurfaceSpeed;
const u10DragWith = _u10DragWith;
const u10Log = _u10Log;
const u10Power = _u10Power;

/** Facts about a deployment that the diagnostics need besides the data. */
export interface DeploymentContext {
  platformKind: "mooring" | "drifter";
  /** Nominal position (degrees), used when the file has no per-record position. */
  latitude?: number;
  longitude?: number;
  /** Anemometer height above the sea surface, m. Assumed 10 (no adjustment) when absent, and recorded. */
  windHeightM?: number;
  /** Current-meter depth, m (recorded in provenance; angle/ratio assume a near-surface current). */
  currentDepthM?: number;
  /** θ_off: bearing (degree true) of the normal from land to sea, for the coastal upwelling index. */
  coastlineDeg?: number;
}

/** Method choices and constants of a run, stored beside its results. */
export interface Provenance {
  engine: string;
  settingsVersion: number;
  dragLaw: string;
  dragLawSource: string;
  neutralWind: { method: string; windHeightM: number; windHeightAssumed: boolean; powerExponent?: number; z0?: number; kappa: number };
  airDensity: { method: string; value?: number; formula?: string };
  seawaterDensity: { method: "fixed"; value: number; source: string };
  coriolis: { omega: number; earthRadiusM: number };
  equatorCutoffDeg: number;
  eddyViscosity: number;
  ekmanDepthCoefficient: number;
  drifter: { velocity: string; impliedSpeed: string };
  coastlineDeg: number | null;
  currentDepthM: number | null;
  caution: string;
  /** The full settings snapshot the run used. */
  settings: QcSettings;
}

/** The one-line caution shown wherever diagnostics appear (DOMAIN §13). */
export const CAUTION =
  "Diagnostics are scientific estimates, not for navigation, offshore operations or safety decisions; defer to official forecasts, local regulations and qualified practice.";

/** Builds the provenance record for a run. O(1). */
export function buildProvenance(settings: QcSettings, ctx: DeploymentContext): Provenance {
  const d = settings.diagnostics;
  const nw = d.neutralWind;
  return {
    engine: "tauline-compute 1",
    settingsVersion: settings.version,
    dragLaw: d.dragLaw,
    dragLawSource: dragLawSources[d.dragLaw],
    neutralWind: {
      method: nw.method === "drag" ? `iterative log profile with the ${d.dragLaw} drag law` : nw.method === "power" ? "power law" : "log law, fixed roughness",
      windHeightM: ctx.windHeightM ?? 10,
      windHeightAssumed: ctx.windHeightM === undefined,
      powerExponent: nw.method === "power" ? nw.powerExponent : undefined,
      z0: nw.method === "log" ? nw.z0 : undefined,
      kappa: KAPPA,
    },
    airDensity:
      d.airDensity.method === "fixed"
        ? { method: "fixed", value: d.airDensity.value }
        : { method: "ideal_gas", formula: "p/(R_d·T_v), Bolton 1980 e_s, R_d 287.05, dry air where humidity is absent" },
    seawaterDensity: { method: "fixed", value: d.seawaterDensity, source: "common practice (no TEOS-10 evaluation)" },
    coriolis: { omega: OMEGA, earthRadiusM: EARTH_RADIUS_M },
    equatorCutoffDeg: d.equatorCutoffDeg,
    eddyViscosity: d.eddyViscosity,
    ekmanDepthCoefficient: d.ekmanDepthCoefficient,
    drifter: { velocity: "WGS84 geodesic (Vincenty), centred over neighbouring fixes", impliedSpeed: "haversine, R 6371 km" },
    coastlineDeg: ctx.coastlineDeg ?? null,
    currentDepthM: ctx.currentDepthM ?? null,
    caution: CAUTION,
    settings: structuredClone(settings),
  };
}

/** Column-wise inputs to `computeDiagnostics`: canonical values and their aggregate flags. */
export interface DiagnosticsInput {
  n: number;
  values: Partial<Record<MeasuredVariable, Float64Array>>;
  flags: Partial<Record<MeasuredVariable, Uint8Array>>;
  /** Drifter velocity from positions (engine-computed), with flags; optional. */
  drift?: { u: Float64Array; v: Float64Array; speed: Float64Array; flag: Uint8Array };
}

/**
 * Reusable output storage for `computeDiagnostics`: with a pool, results are views that stay valid only until the
 * next call with the same pool (saves allocation when streaming).
 */
export type DiagnosticsPool = Map<string, { v: Float64Array; f: Uint8Array }>;

/** Derived values (NaN where not computable) and their aggregate flags, keyed by derived variable. */
export interface DiagnosticsOutput {
  values: Partial<Record<DerivedVariable, Float64Array>>;
  flags: Partial<Record<DerivedVariable, Uint8Array>>;
  /** Why values were not evaluated, with record counts (e.g. the equator mask). */
  notes: Record<string, number>;
}

const RAD = Math.PI / 180;

/**
 * Per-record diagnostics (DOMAIN §3–§8, §10) for one block. Each derived value carries the worst aggregate flag of
 * its inputs (9 if an input is missing); f-divided values are NaN with flag 2 where |lat| < the equator cutoff.
 * Outputs appear only when their inputs exist in the block. Cost O(n), with a short fixed iteration per record
 * for the iterative neutral wind (and for S88).
 */
export function computeDiagnostics(input: DiagnosticsInput, settings: QcSettings, ctx: DeploymentContext, pool?: DiagnosticsPool): DiagnosticsOutput {
  const { n, values: V, flags: F } = input;
  const d = settings.diagnostics;
  const out: DiagnosticsOutput = { values: {}, flags: {}, notes: {} };
  // Pairs of components share one flag array: they always carry the same flag.
  const mk = (name: DerivedVariable, sharedFlags?: Uint8Array) => {
    let v: Float64Array;
    let f: Uint8Array;
    if (pool) {
      let e = pool.get(name);
      if (!e || e.v.length < n) {
        e = { v: new Float64Array(n), f: new Uint8Array(n) };
        pool.set(name, e);
      }
      v = e.v.subarray(0, n);
      f = sharedFlags ?? e.f.subarray(0, n);
    } else {
      v = new Float64Array(n);
      f = sharedFlags ?? new Uint8Array(n);
    }
    out.values[name] = v;
    out.flags[name] = f;
    return [v, f] as const;
  };

  const lat = V.latitude;
  const latF = F.latitude;
  const latFixed = ctx.latitude ?? NaN;
  const hasLat = lat !== undefined || !Number.isNaN(latFixed);

  const cutoff = d.equatorCutoffDeg;
  const rho = d.seawaterDensity;
  const az = d.eddyViscosity;

  if (hasLat) {
    const [fv, ff] = mk("coriolis_parameter");
    const [bv] = mk("beta_parameter", ff); // β shares the latitude flag with f
    const fFixed = coriolis(latFixed);
    const bFixed = beta(latFixed);
    for (let i = 0; i < n; i++) {
      fv[i] = lat ? coriolis(lat[i]!) : fFixed;
      bv[i] = lat ? beta(lat[i]!) : bFixed;
      ff[i] = latF ? latF[i]! : PASS;
    }
  }

  // Wind at the sensor as components with a combined flag.
  let wu: Float64Array | undefined;
  let wv: Float64Array | undefined;
  let wsF: Uint8Array | undefined;
  let wdF: Uint8Array | undefined;
  if (V.eastward_wind && V.northward_wind) {
    wu = V.eastward_wind;
    wv = V.northward_wind;
    // Prefer the flags of the measured representation (speed/direction) when the file had it.
    wsF = F.wind_speed ?? F.eastward_wind!;
    wdF = F.wind_from_direction ?? F.northward_wind!;
  }
  if (!wu || !wv || !wsF || !wdF) return out;

  const z = ctx.windHeightM ?? 10;
  const law = d.dragLaw;
  const nw = d.neutralWind;
  const tAir = V.air_temperature;
  const tAirF = F.air_temperature;
  const [u10, u10F] = mk("wind_speed_10m_neutral");
  const [ue10, ue10F] = mk("eastward_wind_10m_neutral");
  const [vn10, vn10F] = mk("northward_wind_10m_neutral", ue10F);
  const [cd, cdF] = mk("surface_drag_coefficient_for_momentum_in_air");
  const cdOf = dragFunction(law);
  const lz = Math.log(z / 10) / KAPPA;
  for (let i = 0; i < n; i++) {
    const u = wu[i]!;
    const v = wv[i]!;
    const s = Math.sqrt(u * u + v * v);
    const tC = tAir ? tAir[i]! - 273.15 : 15;
    const s10 = nw.method === "drag" ? u10DragWith(s, lz, cdOf, tC) : nw.method === "power" ? u10Power(s, z, nw.powerExponent) : u10Log(s, z, nw.z0);
    const k = s > 0 ? s10 / s : 1;
    u10[i] = s10;
    ue10[i] = u * k;
    vn10[i] = v * k;
    const speedFlag = wsF[i]!;
    const vecFlag = W[(speedFlag << 4) | wdF[i]!];
    u10F[i] = speedFlag;
    ue10F[i] = vecFlag;
    vn10F[i] = vecFlag;
    cd[i] = cdOf(s10, tC);
    cdF[i] = law === "S88" && tAirF ? W[(speedFlag << 4) | tAirF[i]!] : speedFlag;
  }

  const [rhoA, rhoAF] = mk("air_density");
  if (d.airDensity.method === "fixed") {
    rhoA.fill(d.airDensity.value);
    rhoAF.fill(PASS);
  } else {
    const p = V.air_pressure ?? V.air_pressure_at_mean_sea_level;
    const pF = F.air_pressure ?? F.air_pressure_at_mean_sea_level;
    const rh = V.relative_humidity;
    const rhF = F.relative_humidity;
    for (let i = 0; i < n; i++) {
      if (!p || !tAir) {
        rhoA[i] = NaN;
        rhoAF[i] = MISSING;
        continue;
      }
      rhoA[i] = airDensity(p[i]!, tAir[i]!, rh ? rh[i]! : 0);
      let f = W[(pF![i]! << 4) | tAirF![i]!];
      if (rhF && !Number.isNaN(rh![i]!)) f = W[(f << 4) | rhF[i]!];
      rhoAF[i] = f;
    }
  }

  const [tx, txF] = mk("surface_downward_eastward_stress");
  const [ty, tyF] = mk("surface_downward_northward_stress", txF);
  const [tm, tmF] = mk("magnitude_of_surface_downward_stress");
  for (let i = 0; i < n; i++) {
    const k = rhoA[i]! * cd[i]! * u10[i]!;
    tx[i] = k * ue10[i]!;
    ty[i] = k * vn10[i]!;
    tm[i] = k * u10[i]!;
    const fs = W[(W[(cdF[i]! << 4) | rhoAF[i]!]! << 4) | u10F[i]!]!;
    const fv = W[(fs << 4) | ue10F[i]!];
    txF[i] = fv;
    tyF[i] = fv;
    tmF[i] = fs;
  }

  if (hasLat) {
    const [eu, euF] = mk("ekman_transport_eastward");
    const [ev, evF] = mk("ekman_transport_northward", euF);
    const [de, deF] = mk("ekman_depth_empirical");
    const [dt, dtF] = mk("ekman_depth_theoretical");
    const [su, suF] = mk("eastward_sea_water_velocity_due_to_ekman_drift");
    const [sv, svF] = mk("northward_sea_water_velocity_due_to_ekman_drift", suF);
    const coast = ctx.coastlineDeg;
    const up = coast !== undefined ? mk("coastal_upwelling_index", euF) : undefined;
    const sinO = coast !== undefined ? Math.sin(coast * RAD) : 0;
    const cosO = coast !== undefined ? Math.cos(coast * RAD) : 0;
    const fc = out.values.coriolis_parameter!;
    // Terms that depend on latitude alone, computed once when the position is fixed.
    const dtFixed = ekmanDepthTheoretical(az, coriolis(latFixed));
    const sinFixed = Math.sqrt(Math.sin(Math.abs(latFixed) * RAD));
    const sqfFixed = Math.sqrt(Math.abs(coriolis(latFixed)) * az);
    let masked = 0;
    for (let i = 0; i < n; i++) {
      const la = lat ? lat[i]! : latFixed;
      const lf = latF ? latF[i]! : PASS;
      if (!(Math.abs(la) >= cutoff)) {
        // Near the equator (or with no usable latitude) f-divided quantities are not evaluated: NaN, flag 2.
        const mf = Number.isNaN(la) ? MISSING : NOT_EVALUATED;
        if (mf === NOT_EVALUATED) masked++;
        eu[i] = ev[i] = de[i] = dt[i] = su[i] = sv[i] = NaN;
        euF[i] = evF[i] = deF[i] = dtF[i] = suF[i] = svF[i] = mf;
        if (up) {
          up[0][i] = NaN;
          up[1][i] = mf;
        }
        continue;
      }
      const f = fc[i]!;
      const rf = rho * f;
      const vecF = W[(txF[i]! << 4) | lf];
      const ueI = ty[i]! / rf;
      const veI = -tx[i]! / rf;
      eu[i] = ueI;
      ev[i] = veI;
      euF[i] = evF[i] = vecF;
      de[i] = lat ? ekmanDepthEmpirical(u10[i]!, la, d.ekmanDepthCoefficient) : (d.ekmanDepthCoefficient * u10[i]!) / sinFixed;
      deF[i] = W[(u10F[i]! << 4) | lf];
      dt[i] = lat ? ekmanDepthTheoretical(az, f) : dtFixed;
      dtF[i] = lf;
      // Surface current: 45° clockwise of the stress in the north, anticlockwise in the south (sign of f).
      const v0 = lat ? ekmanSurfaceSpeed(tm[i]!, f, az, rho) : tm[i]! / (rho * sqfFixed);
      const m = tm[i]!;
      if (m > 0) {
        const c = Math.SQRT1_2;
        const s = f > 0 ? Math.SQRT1_2 : -Math.SQRT1_2;
        const ex = tx[i]! / m;
        const ey = ty[i]! / m;
        su[i] = v0 * (ex * c + ey * s);
        sv[i] = v0 * (-ex * s + ey * c);
      } else {
        su[i] = m === 0 ? 0 : NaN;
        sv[i] = m === 0 ? 0 : NaN;
      }
      suF[i] = svF[i] = vecF;
      if (up) {
        up[0][i] = 100 * (ueI * sinO + veI * cosO);
        up[1][i] = vecF;
      }
    }
    if (masked) out.notes[`Ekman quantities not evaluated within ${cutoff}° of the equator`] = masked;
  }

  // Current relative to the wind: a measured current if present, else the drifter's own velocity.
  let cu = V.eastward_sea_water_velocity;
  let cv = V.northward_sea_water_velocity;
  let cuF = F.eastward_sea_water_velocity;
  let cvF = F.northward_sea_water_velocity;
  if ((!cu || !cv) && input.drift) {
    cu = input.drift.u;
    cv = input.drift.v;
    cuF = cvF = input.drift.flag;
  }
  if (cu && cv && cuF && cvF) {
    const [ang, angF] = mk("current_wind_angle");
    const [rat, ratF] = mk("current_wind_ratio");
    for (let i = 0; i < n; i++) {
      // Heading of the current minus heading of the wind, as one atan2 of cross and dot products.
      const uc = cu[i]!, vc = cv[i]!, uw = wu[i]!, vw = wv[i]!;
      const cs = Math.sqrt(uc * uc + vc * vc);
      const ws = uw * uw + vw * vw;
      let dA = cs > 0 && ws > 0 ? Math.atan2(uc * vw - vc * uw, vc * vw + uc * uw) / RAD : NaN;
      if (dA === -180) dA = 180;
      ang[i] = dA;
      rat[i] = u10[i]! > 0 ? cs / u10[i]! : NaN;
      const fl = W[(W[(cuF[i]! << 4) | cvF[i]!]! << 4) | ue10F[i]!]!;
      angF[i] = Number.isNaN(ang[i]!) && fl < SUSPECT ? NOT_EVALUATED : fl;
      ratF[i] = Number.isNaN(rat[i]!) && fl < SUSPECT ? NOT_EVALUATED : fl;
    }
  }
  return out;
}
