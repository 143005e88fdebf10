import { describe, expect, test } from "vitest";
import { computeDiagnostics, type DeploymentContext } from "../../../../shared/compute/diagnostics";
import { airDensity, coriolis, dragCoefficient, ekmanTransport, upwellingIndex } from "../../../../shared/compute/physics";
import { windU, windV, currentU, currentV } from "../../../../shared/compute/directions";
import { defaultQcSettings, type QcSettings } from "../../../../shared/schemas/qc-settings";
import type { MeasuredVariable } from "../../../../shared/vocabulary";

type Cols = Partial<Record<MeasuredVariable, number[]>>;
function diag(values: Cols, flags: Cols, ctx: DeploymentContext, settings: QcSettings = defaultQcSettings()) {
  const n = Object.values(values)[0]!.length;
  const V = Object.fromEntries(Object.entries(values).map(([k, v]) => [k, Float64Array.from(v!)]));
  const F = Object.fromEntries(Object.entries(values).map(([k]) => [k, Uint8Array.from(flags[k as MeasuredVariable] ?? new Array(n).fill(1))]));
  const out = computeDiagnostics({ n, values: V, flags: F }, settings, ctx);
  return { v: out.values as Record<string, Float64Array>, f: out.flags as Record<string, Uint8Array> };
}
const wind = (speed: number, from: number) => ({ wind_speed: [speed], eastward_wind: [windU(speed, from)], northward_wind: [windV(speed, from)] });

describe("per-record diagnostics", () => {
  test("the current–wind angle is positive when the current runs to the right of the wind (DOMAIN §7)", () => {
    // Wind from 180° blows toward 0°; a current toward 45° is 45° to its right.
    const { v } = diag({ ...wind(10, 180), eastward_sea_water_velocity: [currentU(0.2, 45)], northward_sea_water_velocity: [currentV(0.2, 45)] }, {}, { platformKind: "mooring", latitude: 40 });
    expect(v.current_wind_angle![0]).toBeCloseTo(45, 9);
    expect(v.current_wind_ratio![0]).toBeCloseTo(0.02, 9);
    const left = diag({ ...wind(10, 180), eastward_sea_water_velocity: [currentU(0.2, 300)], northward_sea_water_velocity: [currentV(0.2, 300)] }, {}, { platformKind: "mooring", latitude: 40 });
    expect(left.v.current_wind_angle![0]).toBeCloseTo(-60, 9);
  });

  test("air density from p, T and RH uses the moist-air formula, and the stress follows it", () => {
    const s = defaultQcSettings();
    s.diagnostics.airDensity = { method: "ideal_gas" };
    const { v } = diag({ ...wind(10, 270), air_pressure: [101325], air_temperature: [293.15], relative_humidity: [0.8] }, {}, { platformKind: "mooring", latitude: 40 }, s);
    expect(v.air_density![0]).toBeCloseTo(airDensity(101325, 293.15, 0.8), 12);
    expect(v.magnitude_of_surface_downward_stress![0]).toBeCloseTo(airDensity(101325, 293.15, 0.8) * 1.2e-3 * 100, 10);
  });

  test("a derived value carries the worst flag of its inputs (suspect humidity → suspect density and stress; missing pressure → missing)", () => {
    const s = defaultQcSettings();
    s.diagnostics.airDensity = { method: "ideal_gas" };
    const { v, f } = diag(
      { wind_speed: [10, 10], eastward_wind: [10, 10], northward_wind: [0, 0], air_pressure: [101325, NaN], air_temperature: [293.15, 293.15], relative_humidity: [0.8, 0.8] },
      { relative_humidity: [3, 1], air_pressure: [1, 9] },
      { platformKind: "mooring", latitude: 40 },
      s,
    );
    expect(Array.from(f.air_density!)).toEqual([3, 9]);
    expect(Array.from(f.surface_downward_eastward_stress!)).toEqual([3, 9]);
    expect(Number.isNaN(v.surface_downward_eastward_stress![1]!)).toBe(true);
    // The Coriolis parameter does not depend on the wind, so it keeps its own (pass) flag.
    expect(Array.from(f.coriolis_parameter!)).toEqual([1, 1]);
  });

  test("the upwelling index from records matches DOMAIN §8's formula with the run's constants", () => {
    const { v } = diag(wind(10, 0), {}, { platformKind: "mooring", latitude: 45, coastlineDeg: 270 });
    const tau = 1.225 * dragCoefficient("LP81", 10) * 10;
    const [ue, ve] = ekmanTransport(tau * windU(10, 0), tau * windV(10, 0), coriolis(45), 1025);
    expect(v.coastal_upwelling_index![0]).toBeCloseTo(upwellingIndex(ue, ve, 270), 9);
    // With LP81 and ρ_a 1.225 this case is +139.07 m³ s⁻¹ per 100 m (DOMAIN §8, computed here).
    expect(v.coastal_upwelling_index![0]).toBeCloseTo(139.07, 2);
  });

  test("with a latitude column the equator mask is applied per record", () => {
    const { v, f } = diag({ latitude: [3, -3, 20], wind_speed: [8, 8, 8], eastward_wind: [8, 8, 8], northward_wind: [0, 0, 0] }, {}, { platformKind: "drifter" });
    expect(Array.from(f.ekman_transport_northward!)).toEqual([2, 2, 1]);
    expect(Number.isNaN(v.ekman_transport_northward![0]!)).toBe(true);
    expect(Number.isFinite(v.ekman_transport_northward![2]!)).toBe(true);
  });

  test("no position and no wind give no Ekman outputs rather than guesses", () => {
    const { v } = diag({ air_temperature: [290] }, {}, { platformKind: "mooring" });
    expect(Object.keys(v)).toEqual([]);
  });

  test("an anemometer at 4 m raises the wind to the 10 m neutral value with the selected law (DOMAIN §3: LY04 8.6628)", () => {
    const s = defaultQcSettings();
    s.diagnostics.dragLaw = "LY04";
    const { v } = diag(wind(8, 90), {}, { platformKind: "mooring", latitude: 30, windHeightM: 4 }, s);
    expect(v.wind_speed_10m_neutral![0]).toBeCloseTo(8.6628, 4);
    expect(v.eastward_wind_10m_neutral![0]).toBeCloseTo(-8.6628, 4);
  });
});

test("β per record is 2Ω cos φ / a: 1.982470e-11 m⁻¹ s⁻¹ at 30° (DOMAIN §2, computed here)", () => {
  const { v, f } = diag({ latitude: [30, -30] }, {}, { platformKind: "drifter" });
  expect(Math.abs(v.beta_parameter![0]! / 1.98247e-11 - 1)).toBeLessThan(1e-6);
  expect(Math.abs(v.beta_parameter![1]! / 1.98247e-11 - 1)).toBeLessThan(1e-6);
  expect(v.coriolis_parameter![1]).toBeCloseTo(-7.292115e-5, 11);
  expect(Array.from(f.beta_parameter!)).toEqual([1, 1]);
});
