/**
 * Bearing conventions (CF `wind_from_direction`, `sea_water_velocity_to_direction`): degrees clockwise from
 * true north; wind is given as where it comes FROM, currents as where they flow TO. atan2 takes (east, north).
 * All functions are O(1) and pure; NaN in gives NaN out.
 */

const RAD = Math.PI / 180;

/** Wraps a bearing into [0, 360) degrees. NaN stays NaN. */
export function wrap360(deg: number): number {
  const r = deg % 360;
  return r < 0 ? r + 360 : r === 0 ? 0 : r;
}

/** Wraps an angle into (−180, 180] degrees. NaN stays NaN. */
export function wrap180(deg: number): number {
  const r = wrap360(deg);
  return r > 180 ? r - 360 : r;
}

/** Eastward wind component (m s-1 or any speed unit) from speed and FROM bearing (degree): u = −U·sin θ. */
export function windU(speed: number, fromDeg: number): number {
  return -speed * Math.sin(fromDeg * RAD);
}

/** Northward wind component from speed and FROM bearing (degree): v = −U·cos θ. */
export function windV(speed: number, fromDeg: number): number {
  return -speed * Math.cos(fromDeg * RAD);
}

/** Eastward current component from speed and TO bearing (degree): u = U·sin θ. */
export function currentU(speed: number, toDeg: number): number {
  return speed * Math.sin(toDeg * RAD);
}

/** Northward current component from speed and TO bearing (degree): v = U·cos θ. */
export function currentV(speed: number, toDeg: number): number {
  return speed * Math.cos(toDeg * RAD);
}

/** FROM bearing (degree, [0, 360)) of the vector (u, v); NaN when u = v = 0 since the direction is undefined. */
export function fromBearing(u: number, v: number): number {
  if (u === 0 && v === 0) return NaN;
  return wrap360(Math.atan2(-u, -v) / RAD);
}

/** TO bearing (degree, [0, 360)) of the vector (u, v); NaN when u = v = 0. */
export function toBearing(u: number, v: number): number {
  if (u === 0 && v === 0) return NaN;
  return wrap360(Math.atan2(u, v) / RAD);
}

/** True bearing from a magnetic one: true = magnetic + declination (east positive), in degrees, wrapped. */
export function magneticToTrue(magneticDeg: number, declinationDeg: number): number {
  return wrap360(magneticDeg + declinationDeg);
}
