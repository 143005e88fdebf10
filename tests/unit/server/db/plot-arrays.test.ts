import { describe, expect, test } from "vitest";
import { readF4, readI2, readI4, writeF4, writeI2, writeI4 } from "../../../../server/db/plot-arrays";

describe("plot_series bucket arrays as bytea", () => {
  test("float4 elements are IEEE 754 binary32, big-endian, as PostgreSQL's float4send writes them", () => {
    // 7.332 → 0x40EA9FBE, −0.5 → 0xBF000000, NaN → 0x7FC00000 (IEEE 754-2008 binary32 encodings; the same bytes
    // PostgreSQL 15's float4send gave for '{7.332,-0.5,NaN}'::real[], checked by hand on this machine).
    const b = writeF4([7.332, -0.5, NaN]);
    expect(b.toString("hex")).toBe("40ea9fbebf0000007fc00000");
    const back = readF4(b);
    expect(back[0]).toBe(Math.fround(7.332));
    expect(back[1]).toBe(-0.5);
    expect(Number.isNaN(back[2])).toBe(true);
  });

  test("int4 counts and int2 flags are big-endian two's complement", () => {
    expect(writeI4([60, 3600, 0]).toString("hex")).toBe("0000003c00000e1000000000");
    expect(writeI2([1, 9, 4]).toString("hex")).toBe("000100090004");
    expect(Array.from(readI4(writeI4([60, 3600, 0])))).toEqual([60, 3600, 0]);
    expect(Array.from(readI2(writeI2([1, 9, 4, 3])))).toEqual([1, 9, 4, 3]);
  });

  test("reads elements from a slice at any byte offset (node-postgres hands bytea as a Buffer view)", () => {
    const whole = Buffer.concat([Buffer.from([0xff]), writeF4([1.5, 2.25])]);
    expect(Array.from(readF4(whole.subarray(1)))).toEqual([1.5, 2.25]);
  });
});
