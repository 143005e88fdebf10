import { beta, coriolis, EARTH_RADIUS_M, ekmanPumping, RHO_SEAWATER_FIXED, sverdrupTransport } from "./physics";

/**
 * Array diagnostics from three or more platforms at one time step (DOMAIN §9): wind-stress curl by a least-squares
 * plane fit on the local tangent plane, Ekman pumping with the β term, and Sverdrup transport. Refusals come back
 * as `{ ok: false, reason }`, never as a throw.
 */

export interface ArrayInput {
  /** Degrees. */
  lat: ArrayLike<number>;
  lon: ArrayLike<number>;
  /** Wind stress components, Pa. */
  taux: ArrayLike<number>;
  tauy: ArrayLike<number>;
  /** Optional aggregate flags of the stress per platform; 3, 4 and 9 are left out of the fit. */
  flags?: ArrayLike<number>;
}

/** Options for `arrayDiagnostics`; every field has a documented default. */
export interface ArrayOptions {
  /** Seawater density, kg m-3 (default 1025, common practice). */
  rho?: number;
  /** Refuse when the smaller singular value of the centred [x y] matrix is below this share of the larger (default 0.1). */
  collinearRatio?: number;
  /** f-divided results are refused for |lat| below this, degrees (default 5). */
  equatorCutoffDeg?: number;
  radiusM?: number;
}

/** A fit with its derived quantities, or a refusal with the reason and how many platforms were usable. */
export type ArrayResult =
  | {
      ok: true;
      used: number;
      centroidLat: number;
      centroidLon: number;
      /** Centroid stress from the fit, Pa. */
      taux: number;
      tauy: number;
      /** ∂τy/∂x − ∂τx/∂y, N m-3. */
      curl: number;
      dTauxDy: number;
      dTauyDx: number;
      /** Residual RMS of the two fits (Pa); null with exactly three platforms (exact fit). */
      residualRms: number | null;
      /** Ekman pumping, m s-1, positive upward, and its curl and β parts. */
      ekmanPumping: number;
      pumpingCurlTerm: number;
      pumpingBetaTerm: number;
      /** Sverdrup meridional transport per unit width, m2 s-1. */
      sverdrup: number;
    }
  | { ok: false; reason: string; used: number };

const RAD = Math.PI / 180;

/**
 * Fits τx and τy as planes over the platforms' tangent-plane positions and derives curl, pumping and Sverdrup
 * transport. NaN positions or stresses, and flags 3/4/9, drop a platform. Cost O(platforms).
 */
export function arrayDiagnostics(input: ArrayInput, opts: ArrayOptions = {}): ArrayResult {
  const rho = opts.rho ?? RHO_SEAWATER_FIXED;
  const a = opts.radiusM ?? EARTH_RADIUS_M;
  const ratio = opts.collinearRatio ?? 0.1;
  const cutoff = opts.equatorCutoffDeg ?? 5;
  const idx: number[] = [];
  for (let i = 0; i < input.lat.length; i++) {
    const f = input.flags ? input.flags[i]! : 1;
    if (f === 3 || f === 4 || f === 9) continue;
    if ([input.lat[i]!, input.lon[i]!, input.taux[i]!, input.tauy[i]!].some((x) => !Number.isFinite(x))) continue;
    idx.push(i);
  }
  const m = idx.length;
  if (m < 3) return { ok: false, reason: `needs at least 3 platforms with valid stress, has ${m}`, used: m };
  // Centroid, with longitudes unwrapped around the first platform so ±180° does not split the array.
  const lon0 = input.lon[idx[0]!]!;
  const lons = idx.map((i) => {
    let d = input.lon[i]! - lon0;
    d -= 360 * Math.round(d / 360);
    return lon0 + d;
  });
  const lats = idx.map((i) => input.lat[i]!);
  const phi0 = lats.reduce((s, x) => s + x, 0) / m;
  const lam0 = lons.reduce((s, x) => s + x, 0) / m;
  const x = lons.map((l) => a * Math.cos(phi0 * RAD) * (l - lam0) * RAD);
  const y = lats.map((p) => a * (p - phi0) * RAD);
  let sxx = 0, sxy = 0, syy = 0;
  for (let k = 0; k < m; k++) {
    sxx += x[k]! * x[k]!;
    sxy += x[k]! * y[k]!;
    syy += y[k]! * y[k]!;
  }
  // Singular values of the centred [x y] matrix are the square roots of the eigenvalues of its 2×2 Gram matrix.
  const tr = sxx + syy;
  const det = sxx * syy - sxy * sxy;
  const disc = Math.sqrt(Math.max(0, (tr * tr) / 4 - det));
  const l1 = tr / 2 + disc;
  const l2 = Math.max(0, tr / 2 - disc);
  if (l1 === 0 || Math.sqrt(l2 / l1) < ratio) {
    return { ok: false, reason: "platforms are (nearly) collinear, so the stress gradient is not determined", used: m };
  }
  const fit = (vals: number[]) => {
    const mean = vals.reduce((s, v) => s + v, 0) / m;
    let sxv = 0, syv = 0;
    for (let k = 0; k < m; k++) {
      sxv += x[k]! * (vals[k]! - mean);
      syv += y[k]! * (vals[k]! - mean);
    }
    const c1 = (sxv * syy - syv * sxy) / det;
    const c2 = (syv * sxx - sxv * sxy) / det;
    let ss = 0;
    for (let k = 0; k < m; k++) {
      const r = vals[k]! - (mean + c1 * x[k]! + c2 * y[k]!);
      ss += r * r;
    }
    return { a0: mean, ax: c1, ay: c2, ss };
  };
  const fx = fit(idx.map((i) => input.taux[i]!));
  const fy = fit(idx.map((i) => input.tauy[i]!));
  const curl = fy.ax - fx.ay;
  const base = {
    used: m,
    centroidLat: phi0,
    centroidLon: ((lam0 + 540) % 360) - 180,
    taux: fx.a0,
    tauy: fy.a0,
    curl,
    dTauxDy: fx.ay,
    dTauyDx: fy.ax,
    residualRms: m > 3 ? Math.sqrt((fx.ss + fy.ss) / (2 * m)) : null,
  };
  if (!(Math.abs(phi0) >= cutoff)) {
    return { ok: false, reason: `centroid latitude ${phi0.toFixed(2)}° is within ${cutoff}° of the equator: pumping and Sverdrup transport not evaluated`, used: m };
  }
  const f = coriolis(phi0);
  const curlTerm = curl / (rho * f);
  const betaTerm = (beta(phi0, a) * fx.a0) / (rho * f * f);
  return {
    ok: true,
    ...base,
    ekmanPumping: ekmanPumping(curl, fx.a0, phi0, rho),
    pumpingCurlTerm: curlTerm,
    pumpingBetaTerm: betaTerm,
    sverdrup: sverdrupTransport(curl, phi0, rho),
  };
}
