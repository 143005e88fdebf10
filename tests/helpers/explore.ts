import { pool } from "../../server/db/client";
import { buildVersion } from "../../server/pipeline/build";
import { as, type TestUser } from "./api";
import { mooringMap, mooringText, storeUpload } from "./pipeline";

/**
 * Builds a version of a dataset from a file's text through the pipeline's own function (no worker): the version
 * row and its QC run as POST /api/datasets/:id/versions leaves them, then `buildVersion`. Returns its id and number.
 */
export async function buildVersionFromText(
  datasetId: string,
  uploader: TestUser,
  text: string,
  opts: { map?: unknown; mode?: "replace" | "append"; overrides?: object } = {},
) {
  const uploadId = await storeUpload(datasetId, uploader.id, text);
  const mode = opts.mode ?? "replace";
  const head = await pool.query(`select id from versions where dataset_id = $1 and state not in ('failed', 'draft') order by number desc limit 1`, [datasetId]);
  const n = await pool.query(`select coalesce(max(number), 0)::int + 1 as n from versions where dataset_id = $1`, [datasetId]);
  const v = await pool.query(
    `insert into versions (dataset_id, number, state, base_version_id, upload_id, created_by) values ($1, $2, 'processing', $3, $4, $5) returning id, number`,
    [datasetId, n.rows[0].n, mode === "append" ? head.rows[0].id : null, uploadId, uploader.id],
  );
  const id: string = v.rows[0].id;
  await pool.query(`insert into qc_runs (version_id, mode, column_map, settings_overrides) values ($1, $2, $3, $4)`, [
    id,
    mode,
    JSON.stringify(opts.map ?? mooringMap()),
    JSON.stringify(opts.overrides ?? {}),
  ]);
  const outcome = await buildVersion(id);
  if (outcome !== "built") throw new Error(`build ${outcome}: ${JSON.stringify((await pool.query(`select error from qc_runs where version_id = $1`, [id])).rows[0])}`);
  return { id, number: v.rows[0].number as number };
}

/** A generated mooring series (shared/demo) built as a version of the dataset; see `buildVersionFromText`. */
export function buildMooringVersion(datasetId: string, uploader: TestUser, opts: { start: number; durationS: number; intervalS: number; mode?: "replace" | "append"; seed?: number }) {
  const text = mooringText({ start: opts.start, durationS: opts.durationS, intervalS: opts.intervalS, ...(opts.seed ? { seed: opts.seed } : {}) });
  return buildVersionFromText(datasetId, uploader, text, { mode: opts.mode });
}

/** Submits (uploader), approves and releases (curator) a ready version through the API. */
export async function releaseVersion(versionId: string, uploader: TestUser, curator: TestUser) {
  for (const [who, step] of [
    [uploader, "submit"],
    [curator, "approve"],
    [curator, "release"],
  ] as const) {
    const r = await as(who.cookie).post(`/api/versions/${versionId}/${step}`).send({});
    if (r.status >= 300) throw new Error(`${step}: ${r.status} ${JSON.stringify(r.body)}`);
  }
}
