import { describe, expect, test } from "vitest";
import geographiclib from "geographiclib-geodesic";
import { ARRAY_MAX_RADIUS_KM, arrayMembers } from "../../../../server/jobs/array-diagnostics.job";

const geod = geographiclib.Geodesic.WGS84;
/** Ellipsoidal distance by GeographicLib (Karney 2013), the outside reference, km. */
const wgs84Km = (a: { latitude: number; longitude: number }, b: { latitude: number; longitude: number }) => geod.Inverse(a.latitude, a.longitude, b.latitude, b.longitude).s12! / 1000;

describe("arrayMembers: which of a project's moorings form the array", () => {
  test("a mooring an ocean away is left out with its distance; the cluster stays whole", () => {
    // Invented positions: a triangle ~30 km across off the west coast of a continent, one mooring mid-ocean.
    const west = { title: "W", latitude: 41.3, longitude: -125.2 };
    const east = { title: "E", latitude: 41.3, longitude: -124.8 };
    const apex = { title: "A", latitude: 41.6, longitude: -125.0 };
    const far = { title: "F", latitude: 41.25, longitude: -27.5 };
    const { inputs, leftOut } = arrayMembers([far, west, east, apex]);
    expect(inputs.map((x) => x.title)).toEqual(["W", "E", "A"]);
    expect(leftOut.map((x) => x.input.title)).toEqual(["F"]);
    // Great-circle distance on a 6 371 km sphere: within 0.5 % of the WGS84 ellipsoid's (GeographicLib) at this
    // range (common practice; DOMAIN §6). The distance is measured from the centre mooring, whichever it is.
    const fromCentre = Math.min(...[west, east, apex].map((c) => wgs84Km(c, far)));
    expect(leftOut[0]!.km).toBeGreaterThan(ARRAY_MAX_RADIUS_KM);
    expect(Math.abs(leftOut[0]!.km / fromCentre - 1)).toBeLessThan(0.006);
  });

  test("moorings either side of the date line are neighbours", () => {
    const a = { latitude: -17.0, longitude: 179.9 };
    const b = { latitude: -17.2, longitude: -179.9 };
    const c = { latitude: -16.8, longitude: -179.95 };
    expect(wgs84Km(a, b)).toBeLessThan(40);
    expect(arrayMembers([a, b, c])).toEqual({ inputs: [a, b, c], leftOut: [] });
  });

  test("two clusters: the larger one is the array", () => {
    const near = [0, 1, 2].map((k) => ({ latitude: 10 + k * 0.2, longitude: 60 + (k % 2) * 0.3 }));
    const other = [0, 1].map((k) => ({ latitude: -30 - k * 0.2, longitude: 10 }));
    const r = arrayMembers([...other, ...near]);
    expect(r.inputs).toEqual(near);
    expect(r.leftOut.map((x) => x.input)).toEqual(other);
    expect(arrayMembers([])).toEqual({ inputs: [], leftOut: [] });
  });
});
