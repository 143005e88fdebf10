import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { drizzle } from "drizzle-orm/node-postgres";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import pg from "pg";
import { afterAll, describe, expect, test } from "vitest";
import { flagSql } from "../../server/db/record-flags";

/**
 * Migration 0014 on a database that already holds records in the earlier layout (one smallint flag column per
 * variable): the flags are packed into their FLAG_ORDER places, values and version ranges are kept, and the
 * table's guards come back; then 0016 moves each row into its version's partition. Runs on a scratch database of its own: migrations up to 0013 from a copy of drizzle/
 * whose journal ends there, rows written the old way, then every migration.
 */
const base = new URL(process.env.DATABASE_URL!);
const scratch = `${base.pathname.slice(1)}_m14_${process.pid}`;
const admin = () => new pg.Client({ connectionString: new URL("/postgres", base).toString() });
const dir = mkdtempSync(join(tmpdir(), "tauline-migrations-"));
afterAll(async () => {
  const c = admin();
  await c.connect();
  await c.query(`drop database if exists ${scratch} with (force)`);
  await c.end();
  rmSync(dir, { recursive: true, force: true });
});

describe("migrations 0014 (packed flags) and 0016 (a partition per version)", () => {
  test("packs every flag column into its place and keeps values, version ranges and guards", async () => {
    const c = admin();
    await c.connect();
    await c.query(`create database ${scratch}`);
    await c.end();
    const url = new URL(`/${scratch}`, base).toString();
    const pool = new pg.Pool({ connectionString: url, max: 2 });
    try {
      const upTo13 = join(dir, "drizzle");
      cpSync("drizzle", upTo13, { recursive: true });
      const journalPath = join(upTo13, "meta", "_journal.json");
      const journal = JSON.parse(readFileSync(journalPath, "utf8"));
      journal.entries = journal.entries.filter((e: { idx: number }) => e.idx <= 13);
      writeFileSync(journalPath, JSON.stringify(journal));
      await migrate(drizzle(pool), { migrationsFolder: upTo13 });

      const ds = "00000000-0000-4000-8000-0000000000d1";
      await pool.query(
        `insert into records (dataset_id, platform, time, valid_from, valid_to, wind_speed, wind_speed_qc, air_temperature, air_temperature_qc, latitude_qc, current_wind_ratio_qc)
         values ($1, '', '2026-10-01T00:00:00Z', 1, 2, 5.5, 3, 280.15, 1, null, 9),
                ($1, 'TD-7', '2026-10-01T00:00:01Z', 2, null, 'NaN', 9, null, null, 4, null)`,
        [ds],
      );

      await migrate(drizzle(pool), { migrationsFolder: "drizzle" });

      const f = (v: string) => `${flagSql(v)} as "f_${v}"`;
      const { rows } = await pool.query(
        `select platform, valid_from, valid_to, wind_speed, air_temperature, length(flags) as bytes,
                ${["wind_speed", "air_temperature", "latitude", "current_wind_ratio", "sea_water_speed"].map(f).join(", ")}
           from records order by time`,
      );
      expect(rows[0]).toEqual({
        platform: "",
        valid_from: 1,
        valid_to: 2,
        wind_speed: 5.5,
        air_temperature: 280.15,
        bytes: 40,
        f_wind_speed: 3,
        f_air_temperature: 1,
        f_latitude: null,
        f_current_wind_ratio: 9,
        f_sea_water_speed: null,
      });
      expect(rows[1]).toMatchObject({ platform: "TD-7", valid_from: 2, valid_to: null, air_temperature: null, bytes: 40, f_wind_speed: 9, f_air_temperature: null, f_latitude: 4, f_current_wind_ratio: null });
      expect(Number.isNaN(rows[1].wind_speed)).toBe(true);
      const cols = await pool.query(`select column_name from information_schema.columns where table_name = 'records' and column_name like '%\\_qc'`);
      expect(cols.rows).toEqual([]);
      const triggers = await pool.query(`select tgname from pg_trigger where tgrelid = 'records'::regclass and not tgisinternal order by 1`);
      expect(triggers.rows.map((r) => r.tgname)).toEqual(["records_frozen_delete_guard", "records_frozen_update_guard", "records_no_truncate"]);

      // Migration 0016 then moved each row into the partition of the version that wrote it, with the same guards.
      const hex = ds.replace(/-/g, "");
      const parts = await pool.query(`select tableoid::regclass::text as t from records order by time`);
      expect(parts.rows.map((r) => r.t)).toEqual([`records_${hex}_1`, `records_${hex}_2`]);
      const partTriggers = await pool.query(`select tgname from pg_trigger where tgrelid = $1::regclass and not tgisinternal order by 1`, [`records_${hex}_1`]);
      expect(partTriggers.rows.map((r) => r.tgname)).toEqual(["records_frozen_delete_guard", "records_frozen_update_guard", "records_no_truncate"]);
    } finally {
      await pool.end();
    }
  });
});
