import { describe, expect, test } from "vitest";
import { defaultQcSettings, resolveQcSettings } from "../../../../shared/schemas/qc-settings";

describe("QC settings", () => {
  test("defaults follow the handbook's starter ranges (DOMAIN §11, common practice)", () => {
    const s = defaultQcSettings();
    expect(s.version).toBe(1);
    expect(s.variables.wind_speed!.sensor).toEqual({ min: 0, max: 60 });
    expect(s.variables.wind_speed!.user).toEqual({ min: 0, max: 35 });
    expect(s.variables.air_pressure!.sensor).toEqual({ min: 85000, max: 109000 });
    expect(s.variables.air_pressure!.user).toEqual({ min: 95000, max: 105000 });
    expect(s.variables.relative_humidity!.sensor).toEqual({ min: 0, max: 1.03 });
    expect(s.multiVariate.calmSpeed).toBe(1);
    expect(s.impliedSpeed).toEqual({ suspect: 2, fail: 3 });
    expect(s.diagnostics.equatorCutoffDeg).toBe(5);
    expect(s.diagnostics.seawaterDensity).toBe(1025);
  });
  test("every threshold can be overridden and null switches a test off", () => {
    const r = resolveQcSettings({ variables: { wind_speed: { user: { min: 0, max: 25 }, spike: null } }, diagnostics: { dragLaw: "LY04", airDensity: { method: "ideal_gas" } } });
    expect(r.success).toBe(true);
    expect(r.data!.variables.wind_speed!.user).toEqual({ min: 0, max: 25 });
    expect(r.data!.variables.wind_speed!.spike).toBeNull();
    expect(r.data!.variables.wind_speed!.sensor).toEqual({ min: 0, max: 60 });
    expect(r.data!.diagnostics.dragLaw).toBe("LY04");
    expect(r.data!.diagnostics.airDensity.method).toBe("ideal_gas");
  });
  test("bad overrides come back as issues, not a throw", () => {
    const r = resolveQcSettings({ diagnostics: { dragLaw: "XX99" as never } });
    expect(r.success).toBe(false);
  });
});
