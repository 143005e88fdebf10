import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import Papa from "papaparse";

const bin = resolve("bin/tauline.mjs");
let dir = "";

function tauline(...args: string[]) {
  const r = spawnSync(process.execPath, [bin, ...args], { encoding: "utf8", timeout: 60_000 });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

const header = "time,ws_kn,wdir,baro_hpa,lat,lon\n";
const rows = [
  "2026-03-01T00:00:00Z,20,225,1013.25,45,-30",
  "2026-03-01T00:10:00Z,21,230,1013.1,45,-30",
  "2026-03-01T00:20:00Z,-999,235,1012.9,45,-30",
  "2026-03-01T00:30:00Z,22,240,abc,45,-30",
  "2026-03-01T00:40:00,22,240,1012.5,45,-30",
  "2026-03-01T00:50:00Z,23,245,1012.4,45,-30",
];
const mapJson = {
  time: { columns: ["time"] },
  columns: [
    { column: "ws_kn", variable: "wind_speed", unit: "knot" },
    { column: "wdir", variable: "wind_from_direction", unit: "degree" },
    { column: "baro_hpa", variable: "air_pressure", unit: "hPa" },
    { column: "lat", variable: "latitude", unit: "degree_north" },
    { column: "lon", variable: "longitude", unit: "degree_east" },
  ],
};

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "tauline-cli-"));
  writeFileSync(join(dir, "data.csv"), header + rows.join("\n") + "\n");
  writeFileSync(join(dir, "map.json"), JSON.stringify(mapJson));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// Each test starts a Node process with the TypeScript loader; allow for slow shared machines.
describe("tauline check", { timeout: 60_000 }, () => {
  test("writes one row per record in canonical units with a _qc column per variable and prints a summary", () => {
    const out = join(dir, "out.csv");
    const r = tauline("check", join(dir, "data.csv"), "--map", join(dir, "map.json"), "--wind-height", "10", "--drag-law", "LP81", "--coastline-deg", "270", "--out", out);
    expect(r.err).toBe("");
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/^rows: 6$/m);
    expect(r.out).toMatch(/time span: 2026-03-01T00:00:00Z to 2026-03-01T00:50:00Z/);
    expect(r.out).toMatch(/line 5, column baro_hpa: unreadable number "abc"/);
    expect(r.out).toMatch(/line 6, column time: unreadable time "2026-03-01T00:40:00"/);
    expect(r.out).toMatch(/caution: Diagnostics are scientific estimates, not for navigation/);
    const parsed = Papa.parse<Record<string, string>>(readFileSync(out, "utf8").trim(), { header: true });
    const recs = parsed.data;
    expect(recs).toHaveLength(6);
    for (const name of ["wind_speed", "wind_speed_qc", "air_pressure_qc", "surface_downward_eastward_stress", "surface_downward_eastward_stress_qc", "ekman_transport_northward", "coastal_upwelling_index"]) {
      expect(parsed.meta.fields).toContain(name);
    }
    // 20 kn is 10.2889 m/s (definition); 1013.25 hPa is 101325 Pa.
    expect(Number(recs[0]!.wind_speed)).toBeCloseTo(10.2889, 4);
    expect(Number(recs[0]!.air_pressure)).toBe(101325);
    // τx = ρ_a·Cd·U·u (DOMAIN §6) with ρ_a 1.225 and LP81's 1.2e-3 below 11 m/s (Large & Pond 1981); U from 225°.
    expect(Number(recs[0]!.surface_downward_eastward_stress)).toBeCloseTo(1.225 * 1.2e-3 * 10.28889 * 10.28889 * Math.SQRT1_2, 6);
    expect(recs[2]!.wind_speed_qc).toBe("9");
    expect(recs[3]!.air_pressure_qc).toBe("4");
    expect(recs[4]!.wind_speed_qc).toBe("4");
    expect(recs[2]!.surface_downward_eastward_stress_qc).toBe("9");
  });

  test("an unknown variable in the map is one clear line and a non-zero exit", () => {
    const bad = join(dir, "bad-map.json");
    writeFileSync(bad, JSON.stringify({ ...mapJson, columns: [{ column: "ws_kn", variable: "wind_strength", unit: "knot" }] }));
    const r = tauline("check", join(dir, "data.csv"), "--map", bad);
    expect(r.code).not.toBe(0);
    expect(r.err.trim().split("\n")).toHaveLength(1);
    expect(r.err).toMatch(/Unknown variable "wind_strength" for column ws_kn/);
    expect(r.err).not.toMatch(/    at /);
  });

  test("a unit that does not fit the variable names the column", () => {
    const bad = join(dir, "unit-map.json");
    writeFileSync(bad, JSON.stringify({ ...mapJson, columns: [{ column: "baro_hpa", variable: "air_pressure", unit: "knot" }] }));
    const r = tauline("check", join(dir, "data.csv"), "--map", bad);
    expect(r.code).not.toBe(0);
    expect(r.err).toMatch(/Unit "knot" is not allowed for air_pressure \(column baro_hpa\)/);
  });

  test("an unreadable file is one line naming it", () => {
    const r = tauline("check", join(dir, "missing.csv"), "--map", join(dir, "map.json"));
    expect(r.code).not.toBe(0);
    expect(r.err).toMatch(/^tauline: cannot read .*missing\.csv: ENOENT\n$/);
  });

  test("a file whose times are all unreadable is refused with the first bad line", () => {
    const f = join(dir, "times.csv");
    writeFileSync(f, header + "01.03.2026 00:00,20,225,1013,45,-30\n01.03.2026 00:10,20,225,1013,45,-30\n");
    const r = tauline("check", f, "--map", join(dir, "map.json"));
    expect(r.code).not.toBe(0);
    expect(r.err).toMatch(/no record has a readable time \(first problem: line 2: unreadable time "01.03.2026 00:00"/);
  });

  test("a column named in the map but absent from the header is named", () => {
    const f = join(dir, "nohead.csv");
    writeFileSync(f, "time,ws\n2026-03-01T00:00:00Z,3\n");
    const r = tauline("check", f, "--map", join(dir, "map.json"));
    expect(r.code).not.toBe(0);
    expect(r.err).toMatch(/Column "ws_kn" named in the column map is not in the header on line 1/);
  });
});
