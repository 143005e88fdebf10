/**
 * Every check value of DOMAIN.md §14, each with its source named beside it as the handbook tags it. Tolerances are
 * the table's (relative unless marked abs). Seawater density and the freezing point are not here: Tauline does
 * not evaluate TEOS-10 and uses the fixed 1025 kg m-3 (common practice), recorded in provenance.
 */
import { describe, expect, test } from "vitest";
import geodesic from "geographiclib-geodesic";
import {
  airDensity,
  beta,
  coriolis,
  dragCoefficient,
  dragS88,
  ekmanDepthEmpirical,
  ekmanDepthTheoretical,
  ekmanPumping,
  ekmanSurfaceSpeed,
  ekmanSurfaceSpeedEmpirical,
  ekmanTransport,
  pumpingTimeYears,
  SECONDS_PER_YEAR,
  sverdrupTransport,
  u10Drag,
  u10Log,
  u10Power,
  upwellingIndex,
} from "../../../../shared/compute/physics";
import { currentU, currentV, windU, windV, fromBearing, toBearing } from "../../../../shared/compute/directions";
import { haversine, vincentyInverse, fixVelocity } from "../../../../shared/compute/geodesy";
import { arrayDiagnostics } from "../../../../shared/compute/array";
import { computeDiagnostics } from "../../../../shared/compute/diagnostics";
import { FLAG } from "../../../../shared/compute/flags";
import { toCanonical } from "../../../../shared/units";
import { defaultQcSettings } from "../../../../shared/schemas/qc-settings";

const rel = (actual: number, expected: number, tol: number) => {
  expect(Math.abs(actual - expected) / Math.abs(expected)).toBeLessThanOrEqual(tol);
};
const abs = (actual: number, expected: number, tol: number) => {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(tol);
};

describe("Coriolis parameter and beta", () => {
  test("f at 45° and −30° matches gsw.f (python3-gsw 3.6.16; Ω from Groten 2004)", () => {
    rel(coriolis(45), 1.031261e-4, 1e-6);
    rel(coriolis(-30), -7.292115e-5, 1e-6);
  });
  test("β at 30° with a = 6371 km (DOMAIN §2, computed here)", () => {
    rel(beta(30), 1.98247e-11, 1e-6);
  });
});

describe("directions and units", () => {
  test("wind 10 m/s from 225° and current 0.5 m/s toward 135° give the CF-convention components (computed here)", () => {
    abs(windU(10, 225), 7.0711, 1e-4);
    abs(windV(10, 225), 7.0711, 1e-4);
    abs(currentU(0.5, 135), 0.3536, 1e-4);
    abs(currentV(0.5, 135), -0.3536, 1e-4);
    abs(fromBearing(windU(10, 225), windV(10, 225)), 225, 1e-9);
    abs(toBearing(currentU(0.5, 135), currentV(0.5, 135)), 135, 1e-9);
  });
  test("20 knots is 10.2889 m/s (definition: 1 kn = 1852 m/h)", () => {
    abs(toCanonical(20, "speed", "knot"), 10.2889, 1e-4);
  });
});

describe("neutral 10 m wind (DOMAIN §3, z = 4 m, Uz = 8 m/s)", () => {
  test("iterated with LP81 gives 8.6895 m/s and with LY04 8.6628 (computed here, κ = 0.4)", () => {
    rel(u10Drag(8, 4, "LP81"), 8.6895, 1e-4);
    rel(u10Drag(8, 4, "LY04"), 8.6628, 1e-4);
  });
  test("power law p = 0.11 gives 8.8484 m/s (Hsu et al. 1994, from memory) and p = 1/7 9.1188", () => {
    rel(u10Power(8, 4, 0.11), 8.8484, 1e-4);
    rel(u10Power(8, 4, 1 / 7), 9.1188, 1e-4);
  });
  test("log law with z0 = 2e-4 m gives 8.7402 m/s (WMO-No. 8 roughness, from memory)", () => {
    rel(u10Log(8, 4, 2e-4), 8.7402, 1e-4);
  });
});

describe("drag laws (DOMAIN §4 table, 10³·Cd, computed here from the published formulas)", () => {
  const speeds = [3, 5, 8, 10, 15, 20, 25];
  const table: Record<string, number[]> = {
    LP81: [1.2, 1.2, 1.2, 1.2, 1.465, 1.79, 2.115], // Large & Pond 1981 (held at 1.2 below 4 m/s, common practice)
    T90: [1.14, 1.14, 1.14, 1.14, 1.465, 1.79, 2.115], // Trenberth, Large & Olson 1990 (from memory)
    LY04: [1.2712, 1.064, 1.0907, 1.1759, 1.4679, 1.8049, 2.1599], // Large & Yeager 2004
    LY09: [1.2712, 1.064, 1.0906, 1.1756, 1.4643, 1.7847, 2.083], // Large & Yeager 2009
    YT96: [2.1789, 1.218, 1.16, 1.3, 1.65, 2.0, 2.35], // Yelland & Taylor 1996
  };
  for (const [law, row] of Object.entries(table)) {
    test(`${law} matches the table at 3–25 m/s`, () => {
      speeds.forEach((u, i) => rel(dragCoefficient(law as "LP81", u) * 1e3, row[i]!, 1e-4));
    });
  }
  test("§14 rows: LP81 15 m/s 1.4650e-3, LY04 10 m/s 1.1759e-3, LY09 25/35 m/s 2.0830e-3/2.34e-3, YT96 5/10 m/s 1.2180e-3/1.3000e-3", () => {
    rel(dragCoefficient("LP81", 15), 1.465e-3, 1e-4);
    rel(dragCoefficient("LY04", 10), 1.1759e-3, 1e-4);
    rel(dragCoefficient("LY09", 25), 2.083e-3, 1e-4);
    rel(dragCoefficient("LY09", 35), 2.34e-3, 1e-4);
    rel(dragCoefficient("YT96", 5), 1.218e-3, 1e-4);
    rel(dragCoefficient("YT96", 10), 1.3e-3, 1e-4);
  });
  test("LY09 gives 2.2943e-3 at 30 m/s and 2.34e-3 at 35 and 40, where LY04 would give 2.8929e-3 and 3.2653e-3 (computed here)", () => {
    rel(dragCoefficient("LY09", 30), 2.2943e-3, 1e-4);
    rel(dragCoefficient("LY09", 32.999), 2.3383e-3, 1e-4);
    rel(dragCoefficient("LY09", 40), 2.34e-3, 1e-4);
    rel(dragCoefficient("LY04", 35), 2.8929e-3, 1e-4);
    rel(dragCoefficient("LY04", 40), 3.2653e-3, 1e-4);
  });
  test("S88 at 15 °C matches the table, 1.2966e-3 at 10 m/s with z0 1.498e-4 m (Smith 1988, from memory; computed here)", () => {
    const s88 = [0.973, 1.031, 1.1877, 1.2966, 1.5567, 1.8029, 2.0425];
    speeds.forEach((u, i) => rel(dragCoefficient("S88", u, 15) * 1e3, s88[i]!, 1e-3));
    rel(dragS88(10, 15).z0, 1.498e-4, 1e-3);
  });
  test("S88 iterated neutral wind from 4 m at 15 °C gives 8.6976 m/s (computed here)", () => {
    rel(u10Drag(8, 4, "S88", 15), 8.6976, 1e-3);
  });
});

describe("air density (DOMAIN §5)", () => {
  test("dry ICAO standard atmosphere, 101 325 Pa and 288.15 K, is 1.2250 kg/m³ (ICAO standard atmosphere)", () => {
    rel(airDensity(101325, 288.15, 0), 1.225, 1e-4);
  });
  test("1013.25 hPa, 20 °C, RH 0.80 gives 1.1957 kg/m³ (computed here; Bolton e_s, from memory)", () => {
    rel(airDensity(101325, 293.15, 0.8), 1.1957, 1e-3);
    rel(airDensity(101325, 293.15, 0), 1.2041, 1e-3);
    rel(airDensity(100000, 298.15, 0.9), 1.1559, 1e-3);
    rel(airDensity(102000, 273.15, 0.7), 1.2988, 1e-3);
  });
});

describe("wind stress (DOMAIN §6, ρ_a 1.225, computed here)", () => {
  const tau = (law: "LP81" | "LY04" | "LY09", u: number) => 1.225 * dragCoefficient(law, u) * u * u;
  test("10 m/s with LP81 gives 0.14700 Pa, and the vector from 225° is (0.10394, 0.10394) Pa", () => {
    rel(tau("LP81", 10), 0.147, 1e-4);
    const u = windU(10, 225);
    const v = windV(10, 225);
    const k = 1.225 * dragCoefficient("LP81", 10) * 10;
    rel(k * u, 0.10394, 1e-4);
    rel(k * v, 0.10394, 1e-4);
  });
  test("other §6 values: LY04 10 m/s 0.14405, LP81 5 m/s 0.03675, 20 m/s 0.87710 (LP81) and 0.87452 (LY09)", () => {
    rel(tau("LY04", 10), 0.14405, 1e-4);
    rel(tau("LP81", 5), 0.03675, 1e-4);
    rel(tau("LP81", 20), 0.8771, 1e-4);
    rel(tau("LY09", 20), 0.87452, 1e-4);
  });
});

describe("Ekman transport, depth and surface current (DOMAIN §7, Stewart 2008)", () => {
  test("τ = (0, 0.147) Pa gives U_E = ±1.3907 m²/s at 45°N/S; τ = (0.147, 0) gives V_E = −1.9667 at 30°N (eq. 9.26, computed here)", () => {
    rel(ekmanTransport(0, 0.147, coriolis(45), 1025)[0], 1.3907, 1e-4);
    rel(ekmanTransport(0, 0.147, coriolis(-45), 1025)[0], -1.3907, 1e-4);
    rel(ekmanTransport(0.147, 0, coriolis(30), 1025)[1], -1.9667, 1e-4);
    rel(ekmanTransport(0.147, 0, coriolis(-30), 1025)[1], 1.9667, 1e-4);
  });
  test("an eastward stress of 0.1 Pa gives 2.58, 7.68 and 38.3 m²/s at 15°, 5° and 1°N (computed here)", () => {
    rel(-ekmanTransport(0.1, 0, coriolis(15), 1025)[1], 2.58, 2e-3);
    rel(-ekmanTransport(0.1, 0, coriolis(5), 1025)[1], 7.68, 2e-3);
    rel(-ekmanTransport(0.1, 0, coriolis(1), 1025)[1], 38.3, 2e-3);
  });
  test("empirical D_E for 10 m/s at 45° is 90.38 m (eq. 9.16) and theoretical with A_z 0.05 at 45° is 97.83 m (eq. 9.15)", () => {
    rel(ekmanDepthEmpirical(10, 45), 90.38, 1e-3);
    rel(ekmanDepthTheoretical(0.05, coriolis(45)), 97.83, 1e-3);
    rel(ekmanDepthEmpirical(10, 15), 149.39, 1e-3);
    rel(ekmanDepthTheoretical(0.01, coriolis(45)), 43.75, 1e-3);
    rel(ekmanDepthTheoretical(0.1, coriolis(30)), 164.53, 1e-3);
  });
  test("surface current: empirical 0.1510 m/s for 10 m/s at 45° (eq. 9.14); theory 0.0632 m/s for 0.147 Pa, A_z 0.05, 45°N (§9.2)", () => {
    rel(ekmanSurfaceSpeedEmpirical(10, 45), 0.151, 1e-3);
    rel(ekmanSurfaceSpeedEmpirical(10, 15), 0.2496, 1e-3);
    rel(ekmanSurfaceSpeed(0.147, coriolis(45), 0.05, 1025), 0.0632, 1e-3);
  });
  test("at 3° with a 5° cutoff the f-divided diagnostics are NaN with flag 2, never Infinity (common practice)", () => {
    const n = 1;
    const out = computeDiagnostics(
      {
        n,
        values: { latitude: new Float64Array([3]), eastward_wind: new Float64Array([5]), northward_wind: new Float64Array([5]), wind_speed: new Float64Array([Math.SQRT2 * 5]) },
        flags: { latitude: new Uint8Array([1]), eastward_wind: new Uint8Array([1]), northward_wind: new Uint8Array([1]), wind_speed: new Uint8Array([1]) },
      },
      defaultQcSettings(),
      { platformKind: "mooring" },
    );
    for (const k of ["ekman_transport_eastward", "ekman_transport_northward", "ekman_depth_empirical", "eastward_sea_water_velocity_due_to_ekman_drift"] as const) {
      expect(Number.isNaN(out.values[k]![0]!)).toBe(true);
      expect(out.flags[k]![0]).toBe(FLAG.NOT_EVALUATED);
    }
    expect(out.flags.surface_downward_eastward_stress![0]).toBe(FLAG.PASS);
  });
});

describe("coastal upwelling index (DOMAIN §8; Bakun's constants ρ_a 1.22, Cd 0.0013, ρ 1025 from memory; computed here)", () => {
  const ui = (lat: number, offshore: number, fromDeg: number) => {
    const k = 1.22 * 0.0013 * 10;
    const [ue, ve] = ekmanTransport(k * windU(10, fromDeg), k * windV(10, fromDeg), coriolis(lat), 1025);
    return upwellingIndex(ue, ve, offshore);
  };
  test("θ_off 270°: 10 m/s from 0° at 45°N gives +150.04 and from 180° at 15°S +409.92 m³ s⁻¹ per 100 m", () => {
    rel(ui(45, 270, 0), 150.04, 1e-4);
    rel(ui(-15, 270, 180), 409.92, 1e-4);
  });
  test("the rest of the §8 table: −150.04, +106.10 and θ_off 240° at 36°N +156.32", () => {
    rel(ui(45, 270, 180), -150.04, 1e-4);
    rel(ui(45, 270, 315), 106.1, 1e-4);
    rel(ui(36, 240, 0), 156.32, 1e-4);
  });
  test("with LP81 and ρ_a 1.225 the first case gives +139.07", () => {
    const k = 1.225 * dragCoefficient("LP81", 10) * 10;
    const [ue, ve] = ekmanTransport(k * windU(10, 0), k * windV(10, 0), coriolis(45), 1025);
    rel(upwellingIndex(ue, ve, 270), 139.07, 1e-4);
  });
});

describe("Ekman pumping and Sverdrup transport (DOMAIN §9, ρ 1025, year 365.25 days, computed here)", () => {
  test("curl −1e-7 N m⁻³ at 30°N gives w_E −1.3379e-6 m/s with τx = 0 and −9.7417e-7 with τx = 0.1 Pa", () => {
    rel(ekmanPumping(-1e-7, 0, 30), -1.3379e-6, 1e-4);
    rel(ekmanPumping(-1e-7, 0.1, 30), -9.7417e-7, 1e-4);
    rel(ekmanPumping(-1e-7, 0, 30) * SECONDS_PER_YEAR, -42.22, 1e-3);
    rel(ekmanPumping(-1e-7, 0.1, 30) * SECONDS_PER_YEAR, -30.74, 1e-3);
  });
  test("positive curl at 45°N pumps water up, +29.85 m/yr (sign against Stewart's opposite convention)", () => {
    rel(ekmanPumping(1e-7, 0, 45) * SECONDS_PER_YEAR, 29.85, 1e-3);
  });
  test("the three moorings of §9 give curl −8.9932e-8 N m⁻³ and w_E −28.25 m/yr (curl −37.59, β +9.34)", () => {
    const r = arrayDiagnostics({ lat: [30, 30, 31], lon: [-140, -139, -140], taux: [0.08, 0.08, 0.09], tauy: [0, 0, 0] });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    rel(r.curl, -8.9932e-8, 1e-4);
    rel(r.centroidLat, 30.3333, 1e-5);
    rel(r.centroidLon, -139.6667, 1e-5);
    rel(r.taux, 0.083333, 1e-4);
    rel(r.ekmanPumping, -8.9512e-7, 1e-4);
    rel(r.ekmanPumping * SECONDS_PER_YEAR, -28.25, 1e-3);
    rel(r.pumpingCurlTerm * SECONDS_PER_YEAR, -37.59, 1e-3);
    rel(r.pumpingBetaTerm * SECONDS_PER_YEAR, 9.34, 1e-3);
    expect(r.residualRms).toBeNull();
  });
  test("pumping 400 m at 30 m/yr takes 13.3 years (arithmetic)", () => {
    rel(pumpingTimeYears(400, 30 / SECONDS_PER_YEAR), 13.3, 1e-2);
  });
  test("Sverdrup: curl −1e-7 at 30°N gives V = −4.9212 m²/s, −24.61 Sv over 5000 km; +1e-7 at 45°N +6.0272 (Sverdrup 1947)", () => {
    rel(sverdrupTransport(-1e-7, 30), -4.9212, 1e-4);
    rel((sverdrupTransport(-1e-7, 30) * 5e6) / 1e6, -24.61, 1e-3);
    rel(sverdrupTransport(1e-7, 45), 6.0272, 1e-4);
  });
});

describe("geodesics and drifter velocity (DOMAIN §10)", () => {
  const G = geodesic.Geodesic.WGS84;
  test("WGS84 distances match the handbook and npm geographiclib-geodesic 2.2.0 to 1e-3 m", () => {
    const a = vincentyInverse(30, -140, 30.01, -139.99);
    abs(a.s12, 1469.59, 1e-3);
    abs(a.azi1, 41.0325, 1e-4);
    abs(a.s12, G.Inverse(30, -140, 30.01, -139.99).s12!, 1e-3);
    abs(vincentyInverse(0, 0, 0, 1).s12, 111319.491, 1e-3);
    abs(vincentyInverse(30, -140, 31, -140).s12, 110860.926, 1e-3);
  });
  test("haversine with R 6371 km gives 1470.939 m for the first pair (as gsw.distance, python3-gsw 3.6.16)", () => {
    abs(haversine(30, -140, 30.01, -139.99), 1470.939, 1e-3);
    abs(haversine(0, 0, 0, 1), 111194.927, 1e-3);
  });
  test("the first pair one hour apart gives 0.40822 m/s (u 0.26800, v 0.30792) from the geodesic (computed here)", () => {
    const [u, v, s] = fixVelocity(30, -140, 30.01, -139.99, 3600);
    rel(s, 0.40822, 1e-4);
    rel(u, 0.268, 1e-4);
    rel(v, 0.30792, 1e-4);
  });
});

test("flag codes are pass 1, not evaluated 2, suspect 3, fail 4, missing 9 (QARTOD flag manual, from memory = IODE primary levels)", () => {
  expect(FLAG).toEqual({ PASS: 1, NOT_EVALUATED: 2, SUSPECT: 3, FAIL: 4, MISSING: 9 });
});
