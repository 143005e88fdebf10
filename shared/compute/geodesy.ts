/**
 * Distances and azimuths between positions (degrees). Two methods, and callers record which they used:
 * - `vincentyInverse`: the inverse problem on the WGS84 ellipsoid by Vincenty's iteration (Vincenty 1975,
 *   Survey Review 23), good to well under a millimetre except for nearly antipodal points, where it falls back
 *   to the sphere and says so.
 * - `haversine`: great circle on a sphere of radius 6 371 km (as `gsw.distance`), within ~0.5 % of the
 *   ellipsoid; enough for QC speeds.
 */

const RAD = Math.PI / 180;
const WGS84_A = 6378137;
const WGS84_F = 1 / 298.257223563;
const WGS84_B = WGS84_A * (1 - WGS84_F);

/** Great-circle distance, m, on a sphere of `radiusM` (default 6 371 000). NaN in → NaN. O(1). */
export function haversine(lat1: number, lon1: number, lat2: number, lon2: number, radiusM = 6_371_000): number {
  const p1 = lat1 * RAD;
  const p2 = lat2 * RAD;
  const dp = p2 - p1;
  const dl = (lon2 - lon1) * RAD;
  const s = Math.sin(dp / 2) ** 2 + Math.cos(p1) * Math.cos(p2) * Math.sin(dl / 2) ** 2;
  return 2 * radiusM * Math.asin(Math.min(1, Math.sqrt(s)));
}

/** Result of an inverse geodesic: distance (m), forward azimuth at each end (degrees clockwise from north). */
export interface Inverse {
  s12: number;
  azi1: number;
  azi2: number;
  /** False when the iteration did not converge (near-antipodal) and the sphere was used instead. */
  converged: boolean;
}

/**
 * Inverse problem on WGS84 by Vincenty's method. Positions in degrees. Coincident points give s12 = 0 with NaN
 * azimuths. NaN in → NaN out. Cost O(1), up to 200 iterations of a short loop.
 */
export function vincentyInverse(lat1: number, lon1: number, lat2: number, lon2: number): Inverse {
  if (Number.isNaN(lat1 + lon1 + lat2 + lon2)) return { s12: NaN, azi1: NaN, azi2: NaN, converged: false };
  const f = WGS84_F;
  const L = (lon2 - lon1) * RAD;
  const U1 = Math.atan((1 - f) * Math.tan(lat1 * RAD));
  const U2 = Math.atan((1 - f) * Math.tan(lat2 * RAD));
  const sinU1 = Math.sin(U1);
  const cosU1 = Math.cos(U1);
  const sinU2 = Math.sin(U2);
  const cosU2 = Math.cos(U2);
  let lambda = L;
  let sinSigma = 0;
  let cosSigma = 0;
  let sigma = 0;
  let cos2Alpha = 0;
  let cos2SigmaM = 0;
  let sinLambda = 0;
  let cosLambda = 0;
  let converged = false;
  for (let k = 0; k < 200; k++) {
    sinLambda = Math.sin(lambda);
    cosLambda = Math.cos(lambda);
    const a = cosU2 * sinLambda;
    const b = cosU1 * sinU2 - sinU1 * cosU2 * cosLambda;
    sinSigma = Math.sqrt(a * a + b * b);
    if (sinSigma === 0) return { s12: 0, azi1: NaN, azi2: NaN, converged: true };
    cosSigma = sinU1 * sinU2 + cosU1 * cosU2 * cosLambda;
    sigma = Math.atan2(sinSigma, cosSigma);
    const sinAlpha = (cosU1 * cosU2 * sinLambda) / sinSigma;
    cos2Alpha = 1 - sinAlpha * sinAlpha;
    // Along the equator cos²α = 0 and cos 2σm is taken as 0.
    cos2SigmaM = cos2Alpha !== 0 ? cosSigma - (2 * sinU1 * sinU2) / cos2Alpha : 0;
    const C = (f / 16) * cos2Alpha * (4 + f * (4 - 3 * cos2Alpha));
    const prev = lambda;
    lambda = L + (1 - C) * f * sinAlpha * (sigma + C * sinSigma * (cos2SigmaM + C * cosSigma * (-1 + 2 * cos2SigmaM * cos2SigmaM)));
    if (Math.abs(lambda - prev) < 1e-13) {
      converged = true;
      break;
    }
  }
  if (!converged) {
    const s = haversine(lat1, lon1, lat2, lon2);
    const y = Math.sin(L) * Math.cos(lat2 * RAD);
    const x = Math.cos(lat1 * RAD) * Math.sin(lat2 * RAD) - Math.sin(lat1 * RAD) * Math.cos(lat2 * RAD) * Math.cos(L);
    return { s12: s, azi1: Math.atan2(y, x) / RAD, azi2: NaN, converged: false };
  }
  const uSq = (cos2Alpha * (WGS84_A * WGS84_A - WGS84_B * WGS84_B)) / (WGS84_B * WGS84_B);
  const A = 1 + (uSq / 16384) * (4096 + uSq * (-768 + uSq * (320 - 175 * uSq)));
  const B = (uSq / 1024) * (256 + uSq * (-128 + uSq * (74 - 47 * uSq)));
  const deltaSigma =
    B *
    sinSigma *
    (cos2SigmaM +
      (B / 4) *
        (cosSigma * (-1 + 2 * cos2SigmaM * cos2SigmaM) -
          (B / 6) * cos2SigmaM * (-3 + 4 * sinSigma * sinSigma) * (-3 + 4 * cos2SigmaM * cos2SigmaM)));
  const s12 = WGS84_B * A * (sigma - deltaSigma);
  const azi1 = Math.atan2(cosU2 * sinLambda, cosU1 * sinU2 - sinU1 * cosU2 * cosLambda) / RAD;
  const azi2 = Math.atan2(cosU1 * sinLambda, -sinU1 * cosU2 + cosU1 * sinU2 * cosLambda) / RAD;
  return { s12, azi1, azi2, converged: true };
}

/**
 * Velocity (m s-1) between two fixes dt seconds apart: speed s12/dt along the vector mean of the azimuths at the
 * two ends (DOMAIN §10). Returns [u, v, speed]; NaN when dt ≤ 0 or a position is NaN; zero for no movement.
 */
export function fixVelocity(lat1: number, lon1: number, lat2: number, lon2: number, dt: number): [number, number, number] {
  if (!(dt > 0)) return [NaN, NaN, NaN];
  const g = vincentyInverse(lat1, lon1, lat2, lon2);
  if (Number.isNaN(g.s12)) return [NaN, NaN, NaN];
  const speed = g.s12 / dt;
  if (g.s12 === 0) return [0, 0, 0];
  const a1 = g.azi1 * RAD;
  const a2 = Number.isNaN(g.azi2) ? a1 : g.azi2 * RAD;
  const se = Math.sin(a1) + Math.sin(a2);
  const ce = Math.cos(a1) + Math.cos(a2);
  const n = Math.hypot(se, ce);
  return [(speed * se) / n, (speed * ce) / n, speed];
}
