import { describe, expect, test } from "vitest";
import { findUnit, fromCanonical, normalizeUnit, toCanonical } from "../../../shared/units";
import { allowedUnits, isAllowedUnit, resolveVariable } from "../../../shared/vocabulary";

describe("unit conversions (definitions: 1 kn = 1852 m/h, 1 hPa = 1 mbar = 100 Pa, K = degC + 273.15)", () => {
  test("speeds convert to m s-1", () => {
    expect(toCanonical(1, "speed", "knot")).toBeCloseTo(0.514444, 6);
    expect(toCanonical(25, "speed", "cm s-1")).toBeCloseTo(0.25, 12);
    expect(toCanonical(36, "speed", "km h-1")).toBeCloseTo(10, 12);
  });
  test("pressures convert to Pa", () => {
    expect(toCanonical(1013.25, "pressure", "hPa")).toBeCloseTo(101325, 9);
    expect(toCanonical(1013.25, "pressure", "mbar")).toBeCloseTo(101325, 9);
  });
  test("temperatures convert to K, including degF (32 °F is 273.15 K, 212 °F is 373.15 K)", () => {
    expect(toCanonical(20, "temperature", "degC")).toBeCloseTo(293.15, 12);
    expect(toCanonical(32, "temperature", "degF")).toBeCloseTo(273.15, 12);
    expect(toCanonical(212, "temperature", "degF")).toBeCloseTo(373.15, 12);
    expect(fromCanonical(293.15, "temperature", "degC")).toBeCloseTo(20, 12);
  });
  test("80 percent is a fraction of 0.80 (CF canonical unit 1)", () => {
    expect(toCanonical(80, "fraction", "percent")).toBeCloseTo(0.8, 12);
  });
  test("header spellings normalise to UDUNITS, and NaN passes through", () => {
    expect(normalizeUnit("m/s")).toBe("m s-1");
    expect(normalizeUnit("kt")).toBe("knot");
    expect(normalizeUnit("%")).toBe("percent");
    expect(Number.isNaN(toCanonical(NaN, "speed", "knot"))).toBe(true);
    expect(findUnit("speed", "hPa")).toBeUndefined();
  });
});

describe("vocabulary", () => {
  test("a unit from another dimension is not allowed for a variable", () => {
    expect(isAllowedUnit("wind_speed", "knot")).toBe(true);
    expect(isAllowedUnit("wind_speed", "hPa")).toBe(false);
    expect(allowedUnits("air_pressure")).toContain("hPa");
  });
  test("CF names for the opposite bearing convention fold into the canonical one with a 180° turn", () => {
    expect(resolveVariable("wind_to_direction")).toEqual({ canonical: "wind_from_direction", turn180: true });
    expect(resolveVariable("direction_of_sea_water_velocity")).toEqual({ canonical: "sea_water_velocity_to_direction", turn180: false });
    expect(resolveVariable("windspeed")).toBeUndefined();
  });
});
