import { describe, expect, test } from "vitest";
import fc from "fast-check";
import geodesic from "geographiclib-geodesic";
import { computeDiagnostics } from "../../../../shared/compute/diagnostics";
import { defaultQcSettings } from "../../../../shared/schemas/qc-settings";
import { windU, windV, fromBearing, toBearing, wrap180, wrap360 } from "../../../../shared/compute/directions";
import { haversine, vincentyInverse, fixVelocity } from "../../../../shared/compute/geodesy";
import { arrayDiagnostics } from "../../../../shared/compute/array";
import { coriolis, ekmanTransport } from "../../../../shared/compute/physics";

function stressFor(speed: number, fromDeg: number, lat = 40) {
  const u = windU(speed, fromDeg);
  const v = windV(speed, fromDeg);
  const out = computeDiagnostics(
    {
      n: 1,
      values: { latitude: Float64Array.of(lat), wind_speed: Float64Array.of(speed), eastward_wind: Float64Array.of(u), northward_wind: Float64Array.of(v) },
      flags: { latitude: Uint8Array.of(1), wind_speed: Uint8Array.of(1), eastward_wind: Uint8Array.of(1), northward_wind: Uint8Array.of(1) },
    },
    defaultQcSettings(),
    { platformKind: "mooring", windHeightM: 4 },
  );
  const g = (k: string) => (out.values as Record<string, Float64Array>)[k]![0]!;
  return { tx: g("surface_downward_eastward_stress"), ty: g("surface_downward_northward_stress"), ue: g("ekman_transport_eastward"), ve: g("ekman_transport_northward"), su: g("eastward_sea_water_velocity_due_to_ekman_drift"), sv: g("northward_sea_water_velocity_due_to_ekman_drift") };
}

describe("physical symmetries (property tests)", () => {
  test("rotating the wind rotates the stress by the same angle and keeps its size", () => {
    fc.assert(
      fc.property(fc.double({ min: 0.5, max: 40, noNaN: true }), fc.double({ min: 0, max: 360, noNaN: true }), fc.double({ min: -180, max: 180, noNaN: true }), (s, d, rot) => {
        const a = stressFor(s, d);
        const b = stressFor(s, wrap360(d + rot));
        expect(Math.hypot(b.tx, b.ty)).toBeCloseTo(Math.hypot(a.tx, a.ty), 10);
        // The stress heading follows the wind heading (toward = from + 180).
        expect(Math.abs(wrap180(toBearing(b.tx, b.ty) - toBearing(a.tx, a.ty) - rot))).toBeLessThan(1e-6);
        expect(Math.abs(wrap180(toBearing(a.tx, a.ty) - (d + 180)))).toBeLessThan(1e-6);
      }),
    );
  });
  test("Ekman transport lies 90° to the right of the stress in the north and to the left in the south (Stewart 2008 eq. 9.26)", () => {
    fc.assert(
      fc.property(fc.double({ min: -0.5, max: 0.5, noNaN: true }), fc.double({ min: -0.5, max: 0.5, noNaN: true }), fc.double({ min: 5, max: 85, noNaN: true }), (tx, ty, lat) => {
        fc.pre(Math.hypot(tx, ty) > 1e-4);
        for (const sign of [1, -1]) {
          const [ue, ve] = ekmanTransport(tx, ty, coriolis(sign * lat));
          const cross = tx * ve - ty * ue; // z-component of τ × M: negative when M is clockwise (right) of τ
          expect(Math.sign(cross)).toBe(-sign);
          expect(Math.abs(tx * ue + ty * ve)).toBeLessThan(1e-9 * Math.hypot(tx, ty) * Math.hypot(ue, ve) + 1e-15);
        }
      }),
    );
  });
  test("the theoretical surface Ekman current is 45° right of the stress in the north, left in the south", () => {
    for (const lat of [30, -30]) {
      const r = stressFor(10, 200, lat);
      const turn = wrap180(toBearing(r.su, r.sv) - toBearing(r.tx, r.ty));
      expect(turn).toBeCloseTo(lat > 0 ? 45 : -45, 9);
    }
  });
  test("converting a direction to components and back returns it", () => {
    fc.assert(
      fc.property(fc.double({ min: 0.01, max: 80, noNaN: true }), fc.double({ min: 0, max: 359.999, noNaN: true }), (s, d) => {
        expect(Math.abs(wrap180(fromBearing(windU(s, d), windV(s, d)) - d))).toBeLessThan(1e-9);
      }),
    );
    expect(Number.isNaN(fromBearing(0, 0))).toBe(true);
  });
});

describe("geodesy against npm geographiclib-geodesic 2.2.0", () => {
  const G = geodesic.Geodesic.WGS84;
  test("distances and azimuths agree to a millimetre for random pairs", () => {
    fc.assert(
      fc.property(
        fc.double({ min: -80, max: 80, noNaN: true }),
        fc.double({ min: -180, max: 180, noNaN: true }),
        fc.double({ min: -80, max: 80, noNaN: true }),
        fc.double({ min: -180, max: 180, noNaN: true }),
        (a, b, c, d) => {
          fc.pre(Math.abs(d - b) < 170); // keep clear of nearly antipodal pairs
          const r = G.Inverse(a, b, c, d);
          const v = vincentyInverse(a, b, c, d);
          expect(Math.abs(v.s12 - r.s12!)).toBeLessThan(1e-3);
          if (r.s12! > 1) expect(Math.abs(wrap180(v.azi1 - r.azi1!))).toBeLessThan(1e-6);
        },
      ),
      { numRuns: 300 },
    );
  }, 30_000);
  // DOMAIN §10 says "about 0.5 %"; north–south steps at the equator, where the meridian's radius of curvature is
  // smallest, reach 0.56 % (found with geographiclib), so the bound asserted here is 0.6 %.
  test("haversine stays within about 0.5 % (under 0.6 %) of the geodesic for steps under 100 km (DOMAIN §10)", () => {
    fc.assert(
      fc.property(fc.double({ min: -75, max: 75, noNaN: true }), fc.double({ min: -180, max: 180, noNaN: true }), fc.double({ min: -0.6, max: 0.6, noNaN: true }), fc.double({ min: -0.6, max: 0.6, noNaN: true }), (la, lo, dla, dlo) => {
        const r = G.Inverse(la, lo, la + dla, lo + dlo);
        fc.pre(r.s12! > 10 && r.s12! < 100_000);
        expect(Math.abs(haversine(la, lo, la + dla, lo + dlo) / r.s12! - 1)).toBeLessThan(0.006);
      }),
    );
  });
  test("drifter speed from positions equals the geographiclib distance over time", () => {
    fc.assert(
      fc.property(fc.double({ min: -70, max: 70, noNaN: true }), fc.double({ min: -179, max: 179, noNaN: true }), fc.double({ min: -0.05, max: 0.05, noNaN: true }), fc.double({ min: -0.05, max: 0.05, noNaN: true }), (la, lo, dla, dlo) => {
        const r = G.Inverse(la, lo, la + dla, lo + dlo);
        fc.pre(r.s12! > 1);
        const [u, v, s] = fixVelocity(la, lo, la + dla, lo + dlo, 3600);
        expect(Math.abs(s - r.s12! / 3600)).toBeLessThan(1e-6);
        expect(Math.hypot(u, v)).toBeCloseTo(s, 9);
      }),
    );
  });
});

describe("array diagnostics refusals", () => {
  test("fewer than three valid platforms is refused with a reason", () => {
    const r = arrayDiagnostics({ lat: [30, 31, 30], lon: [-140, -140, -139], taux: [0.1, 0.1, NaN], tauy: [0, 0, 0] });
    expect(r).toMatchObject({ ok: false, used: 2 });
    if (!r.ok) expect(r.reason).toMatch(/at least 3/);
  });
  test("flagged platforms are left out of the fit", () => {
    const r = arrayDiagnostics({ lat: [30, 31, 30, 30.5], lon: [-140, -140, -139, -139.5], taux: [0.1, 0.1, 0.1, 0.1], tauy: [0, 0, 0, 0], flags: [1, 1, 4, 3] });
    expect(r.ok).toBe(false);
  });
  test("collinear platforms are refused", () => {
    const r = arrayDiagnostics({ lat: [30, 30.5, 31], lon: [-140, -139.5, -139], taux: [0.1, 0.11, 0.12], tauy: [0, 0, 0] });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(/collinear/);
  });
  test("near the equator pumping is refused rather than blowing up", () => {
    const r = arrayDiagnostics({ lat: [1, 2, 1], lon: [-140, -140, -139], taux: [0.05, 0.06, 0.05], tauy: [0, 0, 0] });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(/equator/);
  });
  test("four platforms on a plane fit exactly with zero residual, and the array straddling 180° is unwrapped", () => {
    // A uniform gradient dτx/dy on the tangent plane: the fit recovers it from any four platforms.
    const lat = [30, 31, 30, 31];
    const lon = [179.5, 179.5, -179.5, -179.5];
    const a = 6_371_000;
    const phi0 = 30.5;
    const y = lat.map((p) => (a * (p - phi0) * Math.PI) / 180);
    const r = arrayDiagnostics({ lat, lon, taux: y.map((yy) => 0.1 + 1e-7 * yy), tauy: [0, 0, 0, 0] });
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.curl).toBeCloseTo(-1e-7, 12);
      expect(r.residualRms!).toBeLessThan(1e-12);
      expect(Math.abs(r.centroidLon)).toBeCloseTo(180, 6);
    }
  });
});
