import { describe, expect, test } from "vitest";
import { FLAG_ORDER, flagIndex } from "../../../../server/db/record-flags";
import { copyHeader, copyTrailer, createRecordEncoder } from "../../../../server/pipeline/copy-encoder";

// Layout from the PostgreSQL manual, "COPY — Binary Format": 11-byte signature, int32 flags, int32 extension length;
// per tuple an int16 field count, then per field an int32 length (−1 = NULL) and the value in network byte order.
describe("binary COPY encoding of records", () => {
  test("header and trailer follow the manual", () => {
    expect(copyHeader().toString("latin1", 0, 11)).toBe("PGCOPY\n\xff\r\n\0");
    expect(copyHeader().length).toBe(19);
    expect(copyTrailer().readInt16BE(0)).toBe(-1);
  });

  test("a row carries dataset, platform, time in µs since 2000, valid_from, the values with NaN as NULL, then the packed flags", () => {
    const enc = createRecordEncoder("00000000-0000-4000-8000-0000000000ab", 7, ["wind_speed", "air_temperature"], ["", "TD-01"]);
    expect(enc.columnList).toBe(`dataset_id, platform, time, valid_from, "wind_speed", "air_temperature", flags`);
    const t = Date.UTC(2026, 9, 1, 0, 0, 1) / 1000 + 0.5;
    const buf = enc.encode({
      n: 1,
      time: Float64Array.of(t),
      platform: Int32Array.of(1),
      values: [Float64Array.of(6.25), Float64Array.of(NaN)],
      flags: [Uint8Array.of(1), Uint8Array.of(9)],
      take: Int32Array.of(0),
      takeCount: 1,
    });
    let o = 0;
    const i16 = () => ((o += 2), buf.readInt16BE(o - 2));
    const i32 = () => ((o += 4), buf.readInt32BE(o - 4));
    expect(i16()).toBe(7);
    expect(i32()).toBe(16);
    expect(buf.subarray(o, o + 16).toString("hex")).toBe("000000000000400080000000000000ab");
    o += 16;
    expect(i32()).toBe(5);
    expect(buf.toString("utf8", o, o + 5)).toBe("TD-01");
    o += 5;
    expect(i32()).toBe(8);
    // 2026-10-01T00:00:01.5Z is 844,128,001.5 s after 2000-01-01T00:00:00Z.
    expect(buf.readBigInt64BE(o)).toBe(844_128_001_500_000n);
    o += 8;
    expect(i32()).toBe(4);
    expect(i32()).toBe(7);
    expect(i32()).toBe(8);
    expect(buf.readDoubleBE(o)).toBe(6.25);
    o += 8;
    expect(i32()).toBe(-1);
    // bytea: one byte per FLAG_ORDER place, the build's variables at theirs and 0 elsewhere.
    expect(i32()).toBe(FLAG_ORDER.length);
    const flags = buf.subarray(o, o + FLAG_ORDER.length);
    o += FLAG_ORDER.length;
    expect(flags[flagIndex("wind_speed")]).toBe(1);
    expect(flags[flagIndex("air_temperature")]).toBe(9);
    expect([...flags].filter((f) => f !== 0)).toHaveLength(2);
    expect(o).toBe(buf.length);
  });

  test("rows of several platforms and a subset of rows: each row carries its own platform and flags", () => {
    const enc = createRecordEncoder("00000000-0000-4000-8000-0000000000ab", 1, ["latitude"], ["A", "BB"]);
    const buf = enc.encode({
      n: 3,
      time: Float64Array.of(1e9, 1e9 + 1, 1e9 + 2),
      platform: Int32Array.of(0, 1, 0),
      values: [Float64Array.of(10, 11, 12)],
      flags: [Uint8Array.of(1, 3, 4)],
      take: Int32Array.of(2, 1),
      takeCount: 2,
    });
    const rows: { platform: string; lat: number; flag: number }[] = [];
    let o = 0;
    for (let r = 0; r < 2; r++) {
      expect(buf.readInt16BE(o)).toBe(6);
      o += 2 + 20;
      const pl = buf.readInt32BE(o);
      const platform = buf.toString("utf8", o + 4, o + 4 + pl);
      o += 4 + pl + 12 + 8;
      const lat = buf.readDoubleBE(o + 4);
      o += 12;
      const fl = buf.readInt32BE(o);
      const flag = buf[o + 4 + flagIndex("latitude")]!;
      o += 4 + fl;
      rows.push({ platform, lat, flag });
    }
    expect(o).toBe(buf.length);
    expect(rows).toEqual([
      { platform: "A", lat: 12, flag: 4 },
      { platform: "BB", lat: 11, flag: 3 },
    ]);
  });
});
