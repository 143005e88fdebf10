import { expect } from "vitest";
import { pool } from "../../server/db/client";
import { as, makeProjectWithRoles } from "./api";
import { makeVersion } from "./curation";
import { makeMooringDataset } from "./pipeline";
import { packFlags } from "../../server/db/record-flags";

/** Variables the fixture stores: two measured (CF names), one derived, and latitude/longitude for drifters. */
export const fixtureVariables = ["wind_speed", "air_temperature", "magnitude_of_surface_downward_stress"] as const;

export interface FixtureRow {
  platform: string;
  time: string;
  values: Record<string, number | null>;
  flags: Record<string, number | null>;
}

/**
 * Invented records (Merrow Shelf scenario) with awkward values for round trips: long fractions, tiny and huge
 * magnitudes, negatives, NaN, missing values, and every QC flag (1, 2, 3, 4, 9).
 */
export function fixtureRows(n: number, platforms: string[] = [""], start = Date.parse("2026-03-01T00:00:00Z")): FixtureRow[] {
  const rows: FixtureRow[] = [];
  const flagCycle = [1, 1, 2, 3, 4, 9, 1, 3];
  for (const platform of platforms) {
    for (let i = 0; i < n; i++) {
      const t = new Date(start + i * 600_000 + (i % 7 === 3 ? 250 : 0)).toISOString();
      const ws = i % 11 === 5 ? null : i % 13 === 6 ? NaN : 7.3 + Math.sin(i / 5) * 3.123456789012345 + 0.1 + 0.2;
      const at = 283.15 + Math.cos(i / 9) * 2.5e-3 - (i % 5) * 1e-12;
      const st = i % 17 === 8 ? -1.5e-310 : i % 4 === 0 ? 1.234e300 : 0.0123456789 * (i + 1);
      rows.push({
        platform,
        time: t,
        values: { wind_speed: ws, air_temperature: at, magnitude_of_surface_downward_stress: st },
        flags: {
          wind_speed: ws === null ? 9 : flagCycle[i % flagCycle.length]!,
          air_temperature: flagCycle[(i + 3) % flagCycle.length]!,
          magnitude_of_surface_downward_stress: flagCycle[(i + 5) % flagCycle.length]!,
        },
      });
    }
  }
  return rows;
}

/** Inserts rows for a version number (valid_from = number) in batches. */
export async function insertRecords(datasetId: string, versionNumber: number, rows: FixtureRow[]) {
  const cols = ["dataset_id", "platform", "time", "valid_from", ...fixtureVariables, "flags"];
  // records is partitioned per version (drizzle/0016_records_partition_per_build.sql); a build makes its own.
  await pool.query(`select records_partition($1, $2)`, [datasetId, versionNumber]);
  for (let i = 0; i < rows.length; i += 500) {
    const batch = rows.slice(i, i + 500);
    const values: unknown[] = [];
    const tuples = batch.map((r) => {
      const row = [datasetId, r.platform, r.time, versionNumber, ...fixtureVariables.map((v) => r.values[v]), packFlags(r.flags)];
      const base = values.length;
      values.push(...row.map((x) => (typeof x === "number" && Number.isNaN(x) ? "NaN" : x)));
      return `(${row.map((_, j) => `$${base + j + 1}`).join(", ")})`;
    });
    await pool.query(`insert into records (${cols.join(", ")}) values ${tuples.join(", ")}`, values);
  }
}

/** A version summary as the pipeline writes it (the parts downloads and the catalogue read). */
export function fixtureSummary(rows: FixtureRow[]) {
  const times = rows.map((r) => r.time).sort();
  return {
    rows: rows.length,
    platforms: [],
    start: times[0] ?? null,
    end: times.at(-1) ?? null,
    intervalS: 600,
    gaps: [],
    gapCount: 0,
    coverage: 1,
    variables: fixtureVariables.map((v) => ({ variable: v, unit: "", count: rows.length, min: 0, max: 1, mean: 0.5, std: 0.1, flags: [0, 1, 1, 1, 1] })),
  };
}

/**
 * A project with every role, a mooring dataset (invented name, Merrow Shelf), and a version released through the
 * real curation route (approved version built and uploaded by the contributor, released by the curator).
 */
export async function releasedFixture(opts: { rows?: number; platforms?: string[]; title?: string; latitude?: number; longitude?: number } = {}) {
  const roles = await makeProjectWithRoles();
  const ds = await makeMooringDataset(roles.projectId, { latitude: opts.latitude, longitude: opts.longitude });
  if (opts.title) await pool.query(`update datasets set title = $2 where id = $1`, [ds.datasetId, opts.title]);
  const rows = fixtureRows(opts.rows ?? 200, opts.platforms);
  const versionId = await makeVersion({
    datasetId: ds.datasetId,
    state: "approved",
    createdBy: roles.users.contributor.id,
    uploaderId: roles.users.contributor.id,
    summary: fixtureSummary(rows),
  });
  await insertRecords(ds.datasetId, 1, rows);
  const rel = await as(roles.users.curator.cookie).post(`/api/versions/${versionId}/release`).send({ authors: ["Ada Merrow", "Bram Tideway"] });
  expect(rel.status).toBe(201);
  return { ...roles, ...ds, versionId, releaseId: rel.body.id as string, rows };
}
