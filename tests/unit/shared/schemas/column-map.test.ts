import { describe, expect, test } from "vitest";
import { columnMapSchema } from "../../../../shared/schemas/column-map";

const base = { time: { columns: ["time"] }, columns: [{ column: "ws", variable: "wind_speed", unit: "knot" }] };

describe("column map schema", () => {
  test("fills defaults for delimiter, decimal mark, header row and missing codes", () => {
    const m = columnMapSchema.parse(base);
    expect(m).toMatchObject({ delimiter: ",", decimalMark: ".", headerRow: 1, time: { format: "iso8601", zone: null } });
    expect(m.missingValues).toContain("-999");
  });
  test("an unknown variable is rejected with a message naming the column", () => {
    const r = columnMapSchema.safeParse({ ...base, columns: [{ column: "ws", variable: "wind_velocity", unit: "m s-1" }] });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0]!.message).toMatch(/Unknown variable "wind_velocity" for column ws/);
  });
  test("a unit that does not fit the variable is rejected, listing the allowed ones", () => {
    const r = columnMapSchema.safeParse({ ...base, columns: [{ column: "ws", variable: "wind_speed", unit: "hPa" }] });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0]!.message).toMatch(/Unit "hPa" is not allowed for wind_speed \(column ws\); allowed: m s-1/);
  });
  test("a direction convention that contradicts the variable is rejected", () => {
    const r = columnMapSchema.safeParse({ ...base, columns: [{ column: "wd", variable: "wind_from_direction", unit: "degree", convention: "to" }] });
    expect(r.success).toBe(false);
    const ok = columnMapSchema.safeParse({ ...base, columns: [{ column: "wd", variable: "wind_to_direction", unit: "degree", convention: "to" }] });
    expect(ok.success).toBe(true);
  });
  test("two columns for one variable are rejected", () => {
    const r = columnMapSchema.safeParse({ ...base, columns: [base.columns[0], { column: "ws2", variable: "wind_speed", unit: "m s-1" }] });
    expect(r.success).toBe(false);
  });
  test("a zone must be UTC or a fixed offset", () => {
    expect(columnMapSchema.safeParse({ ...base, time: { columns: ["time"], zone: "+02:00" } }).success).toBe(true);
    expect(columnMapSchema.safeParse({ ...base, time: { columns: ["time"], zone: "Mars/Olympus" } }).success).toBe(false);
  });
});
