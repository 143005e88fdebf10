import { createHash, randomUUID } from "node:crypto";
import pg from "pg";
import { demoMooringDefaults, mooringChunks } from "../../shared/demo/generate";
import { packFlags } from "../../server/db/record-flags";
import { writeF4, writeI2, writeI4 } from "../../server/db/plot-arrays";

/**
 * Test-only seeding for the curation browser test: writes versions as the processing pipeline leaves them
 * (records, summary, QC report, hourly plot buckets) straight into the e2e database, so the test starts where
 * processing ends. Never used by a production route. All data is the invented demo mooring series.
 */
const VARS = [
  ["wind_speed", "m s-1"],
  ["air_temperature", "K"],
  ["air_pressure", "Pa"],
  ["sea_surface_temperature", "K"],
  ["eastward_sea_water_velocity", "m s-1"],
  ["northward_sea_water_velocity", "m s-1"],
] as const;

interface Row {
  time: number;
  values: number[];
  flags: number[];
}

/** Three days of the demo mooring at 10-minute steps, in canonical units; `spikeAt` marks a wind stretch failed. */
function series(startS: number, days: number, opts: { spikeFrom?: number; spikeHours?: number } = {}): Row[] {
  const rows: Row[] = [];
  for (const c of mooringChunks({ ...demoMooringDefaults, start: startS, durationS: days * 86400, intervalS: 600 })) {
    for (let k = 0; k < c.n; k++) {
      const t = c.time[k]!;
      const values = [
        c.wind_speed[k]!,
        c.air_temperature[k]! + 273.15,
        c.air_pressure[k]! * 100,
        c.sea_surface_temperature[k]! + 273.15,
        c.current_east[k]! / 100,
        c.current_north[k]! / 100,
      ];
      const flags = values.map(() => 1);
      if (opts.spikeFrom !== undefined && t >= opts.spikeFrom && t < opts.spikeFrom + (opts.spikeHours ?? 3) * 3600) {
        values[0] = values[0]! + 35;
        flags[0] = t < opts.spikeFrom + 3600 ? 4 : 3;
      }
      rows.push({ time: t, values, flags });
    }
  }
  return rows;
}

function summarise(rows: Row[]) {
  const variables = VARS.map(([variable, unit], v) => {
    const flags = new Array(10).fill(0) as number[];
    let n = 0, mean = 0, m2 = 0, min = Infinity, max = -Infinity;
    for (const r of rows) {
      flags[r.flags[v]!]!++;
      if (r.flags[v]! > 2) continue;
      const x = r.values[v]!;
      n++;
      const d = x - mean;
      mean += d / n;
      m2 += d * (x - mean);
      min = Math.min(min, x);
      max = Math.max(max, x);
    }
    return { variable, unit, count: n, min, max, mean, std: n > 1 ? Math.sqrt(m2 / (n - 1)) : null, flags };
  });
  const iso = (t: number) => new Date(t * 1000).toISOString();
  const start = iso(rows[0]!.time);
  const end = iso(rows[rows.length - 1]!.time);
  return { rows: rows.length, platforms: [{ id: "", rows: rows.length, start, end }], start, end, intervalS: 600, gaps: [], gapCount: 0, coverage: 1, variables };
}

function hourlyWorst(rows: Row[], v: number) {
  const t0 = Math.floor(rows[0]!.time / 3600) * 3600;
  const worst: number[] = [];
  for (const r of rows) {
    const i = Math.floor((r.time - t0) / 3600);
    while (worst.length <= i) worst.push(0);
    worst[i] = Math.max(worst[i]!, r.flags[v]!);
  }
  return { t0, worst };
}

async function insertRecords(c: pg.Client, datasetId: string, rows: Row[], validFrom: number) {
  const cols = [...VARS.map(([v]) => v), "flags"];
  // records is partitioned per version (drizzle/0016_records_partition_per_build.sql); a build makes its own.
  await c.query(`select records_partition($1, $2)`, [datasetId, validFrom]);
  for (let s = 0; s < rows.length; s += 200) {
    const part = rows.slice(s, s + 200);
    const params: unknown[] = [];
    const tuples = part.map((r) => {
      const vals = [datasetId, new Date(r.time * 1000).toISOString(), validFrom, ...r.values, packFlags(Object.fromEntries(VARS.map(([v], i) => [v, r.flags[i]])))];
      const base = params.length;
      params.push(...vals);
      return `(${vals.map((_, i) => `$${base + i + 1}`).join(",")})`;
    });
    await c.query(`insert into records (dataset_id, time, valid_from, ${cols.join(", ")}) values ${tuples.join(",")}`, params);
  }
}

async function addVersion(
  c: pg.Client,
  o: { datasetId: string; number: number; state: string; userId: string; rows: Row[]; baseVersionId?: string | null },
) {
  const uploadId = randomUUID();
  const body = `demo upload ${uploadId}`;
  await c.query(
    `insert into uploads (id, dataset_id, uploader_id, original_name, storage_key, size_bytes, sha256) values ($1, $2, $3, $4, $5, $6, $7)`,
    [uploadId, o.datasetId, o.userId, `merrow-logger-v${o.number}.csv`, `e2e-seed/${uploadId}`, body.length, createHash("sha256").update(body).digest("hex")],
  );
  const summary = summarise(o.rows);
  const { rows: [v] } = await c.query(
    `insert into versions (dataset_id, number, state, base_version_id, upload_id, created_by, summary) values ($1, $2, $3, $4, $5, $6, $7) returning id`,
    [o.datasetId, o.number, o.state === "released" ? "approved" : o.state, o.baseVersionId ?? null, uploadId, o.userId, summary],
  );
  const testCounts: Record<string, Record<string, [number, number]>> = {};
  const failed = o.rows.filter((r) => r.flags[0]! >= 3);
  if (failed.length) testCounts.wind_speed = { SPIKE: [failed.filter((r) => r.flags[0] === 3).length, failed.filter((r) => r.flags[0] === 4).length] };
  const flagCounts = Object.fromEntries(summary.variables.map((s) => [s.variable, s.flags]));
  await c.query(
    `insert into qc_runs (version_id, state, mode, attempt, stage, column_map, counts, finished_at) values ($1, 'succeeded', 'replace', 1, 'done', '{}', $2, now())`,
    [v.id, { mode: "replace", attempt: 1, settings: {}, provenance: {}, rowsRead: o.rows.length, rowsWritten: o.rows.length, rowsReplaced: 0, rowsDropped: 0, testCounts, flagCounts, warnings: [], warningCount: 0, timings: {} }],
  );
  const { t0, worst } = hourlyWorst(o.rows, 0);
  const nan = worst.map(() => Number.NaN);
  await c.query(
    `insert into plot_series (version_id, platform, variable, step_s, t0, min, max, mean, n, worst_flag) values ($1, '', 'wind_speed', 3600, $2, $3, $3, $3, $4, $5)`,
    [v.id, t0, writeF4(nan), writeI4(worst.map(() => 6)), writeI2(worst)],
  );
  await c.query(`insert into audit_log (actor_id, action, entity_type, entity_id, from_state, to_state) values (null, 'version.built', 'version', $1, 'processing', 'ready')`, [v.id]);
  if (o.state === "in_review") {
    await c.query(`insert into audit_log (actor_id, action, entity_type, entity_id, from_state, to_state) values ($1, 'version.submit', 'version', $2, 'ready', 'in_review')`, [o.userId, v.id]);
  }
  return v.id as string;
}

export interface CurationScenario {
  /** Merrow North: v1 released, v2 (three days appended, with a wind spike) in review. */
  northV2: string;
  /** Merrow South: v1 in review. */
  southV1: string;
}

/** Seeds two versions in review (and the release they build on) for the demo contributor. Idempotent per database. */
export async function seedCurationScenario(databaseUrl: string): Promise<CurationScenario> {
  const c = new pg.Client({ connectionString: databaseUrl });
  await c.connect();
  try {
    await c.query("begin");
    const { rows: [contributor] } = await c.query(`select id from "user" where email = 'data@merrow.example'`);
    const { rows: [curator] } = await c.query(`select id from "user" where email = 'curator2@merrow.example'`);
    const { rows: ds } = await c.query(`select id, title, project_id from datasets where title like 'Merrow North%' or title like 'Merrow South%' order by title`);
    const north = ds.find((d) => d.title.startsWith("Merrow North"))!;
    const south = ds.find((d) => d.title.startsWith("Merrow South"))!;
    const existing = await c.query(`select v.id, d.title from versions v join datasets d on d.id = v.dataset_id where v.state = 'in_review' and d.id in ($1, $2)`, [north.id, south.id]);
    if (existing.rows.length >= 2) {
      await c.query("rollback");
      return { northV2: existing.rows.find((r) => r.title.startsWith("Merrow North")).id, southV1: existing.rows.find((r) => r.title.startsWith("Merrow South")).id };
    }
    const start = Date.UTC(2026, 9, 1) / 1000;
    const v1Rows = series(start, 3);
    const v1 = await addVersion(c, { datasetId: north.id, number: 1, state: "released", userId: contributor.id, rows: v1Rows });
    await insertRecords(c, north.id, v1Rows, 1);
    // Release v1 the way the release service does: release row first, then the state change (the triggers check both).
    const releaseId = randomUUID();
    const publicUrl = process.env.E2E_PUBLIC_URL ?? "http://127.0.0.1";
    await c.query(
      `insert into releases (id, version_id, dataset_id, release_number, version_number, released_by, project_name, dataset_title, authors, citation, stable_url, licence)
       select $1, $2, $3, 1, 1, $4, p.name, d.title, array['Tomasz Rein', 'Ada Quenby', 'Baptiste Oland'],
              'Tomasz Rein, Ada Quenby and Baptiste Oland (2026). ' || d.title || ', version 1 [data set]. ' || p.name || '. Tauline release 1. ' || $5,
              $5, 'CC-BY-4.0'
       from datasets d join projects p on p.id = d.project_id where d.id = $3`,
      [releaseId, v1, north.id, curator.id, `${publicUrl}/releases/${releaseId}`],
    );
    await c.query(`update versions set state = 'released', state_changed_at = now() where id = $1`, [v1]);

    // v2 appends three days; the last day of v1 is rewritten with an air-pressure correction (values changed).
    const appended = series(start + 3 * 86400, 3, { spikeFrom: start + 4 * 86400 + 6 * 3600, spikeHours: 4 });
    const lastDay = v1Rows.filter((r) => r.time >= start + 2 * 86400).map((r) => ({ ...r, values: r.values.map((x, i) => (i === 2 ? x + 120 : x)) }));
    const v2Rows = [...v1Rows.filter((r) => r.time < start + 2 * 86400), ...lastDay, ...appended];
    const northV2 = await addVersion(c, { datasetId: north.id, number: 2, state: "in_review", userId: contributor.id, rows: v2Rows, baseVersionId: v1 });
    await c.query(`update records set valid_to = 2 where dataset_id = $1 and time >= $2`, [north.id, new Date((start + 2 * 86400) * 1000).toISOString()]);
    await insertRecords(c, north.id, [...lastDay, ...appended], 2);

    const southRows = series(start, 2, { spikeFrom: start + 86400 + 12 * 3600, spikeHours: 2 });
    const southV1 = await addVersion(c, { datasetId: south.id, number: 1, state: "in_review", userId: contributor.id, rows: southRows });
    await insertRecords(c, south.id, southRows, 1);
    await c.query("commit");
    return { northV2, southV1 };
  } catch (e) {
    await c.query("rollback").catch(() => undefined);
    throw e;
  } finally {
    await c.end();
  }
}

if (process.argv[1]?.endsWith("curation-seed.ts")) {
  const ids = await seedCurationScenario(process.env.DATABASE_URL!);
  console.log(JSON.stringify(ids));
}
