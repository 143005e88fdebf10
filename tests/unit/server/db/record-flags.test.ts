import { describe, expect, test } from "vitest";
import { derivedVariables, measuredVariables } from "../../../../shared/vocabulary";
import { FLAG_ORDER, columnSql, flagIndex, flagSql, packFlags, setFlagsSql } from "../../../../server/db/record-flags";

// The places of flags inside `records.flags` are stored data: they may grow, never move.
describe("packed record flags", () => {
  test("every variable of the vocabulary has one place, and no place is shared", () => {
    for (const v of [...measuredVariables, ...derivedVariables]) expect(FLAG_ORDER).toContain(v);
    expect(new Set(FLAG_ORDER).size).toBe(FLAG_ORDER.length);
  });

  test("places written by migration 0014 stay where they are", () => {
    // The first and last places the migration packed (drizzle/0014_records_packed_flags.sql): moving either would
    // make every stored record read another variable's flag.
    expect(flagIndex("latitude")).toBe(0);
    expect(flagIndex("wind_speed")).toBe(2);
    expect(flagIndex("sea_water_velocity_to_direction")).toBe(17);
    expect(flagIndex("wind_speed_10m_neutral")).toBe(18);
    expect(flagIndex("current_wind_ratio")).toBe(39);
    expect(() => flagIndex("not_a_variable")).toThrow(/FLAG_ORDER/);
  });

  test("packFlags puts each flag at its place and 0 elsewhere", () => {
    const b = packFlags({ wind_speed: 3, air_temperature: 1, latitude: null });
    expect(b.length).toBe(FLAG_ORDER.length);
    expect(b[flagIndex("wind_speed")]).toBe(3);
    expect(b[flagIndex("air_temperature")]).toBe(1);
    expect([...b].filter((x) => x !== 0)).toHaveLength(2);
  });

  test("SQL helpers name the place and keep the reader's column name", () => {
    expect(flagSql("wind_speed", "r.")).toBe("record_flag(r.flags, 2)");
    expect(columnSql("wind_speed_qc")).toBe(`record_flag(flags, 2) as "wind_speed_qc"`);
    expect(columnSql("wind_speed")).toBe(`"wind_speed"`);
    expect(setFlagsSql([{ variable: "wind_speed", value: "4" }])).toBe("set_byte(flags, 2, coalesce((4)::int, get_byte(flags, 2)))");
  });
});
