/**
 * The partition of `records` that holds version N's own rows (valid_from = N) of a dataset. `records` is partitioned
 * by range on (dataset_id, valid_from), one partition per version that wrote rows (drizzle/0016_records_partition_per_build.sql,
 * where the SQL functions below live). A build creates its partition, COPYs into it and attaches it in one
 * transaction; other writers (a manual flag's copy-on-write) ask for it with `ensureRecordPartition`.
 */
import type pg from "pg";

/** Creates the partition in the caller's transaction (not yet attached) and returns its quoted name. */
export async function createRecordPartition(client: pg.ClientBase, datasetId: string, n: number): Promise<string> {
  const r = await client.query<{ t: string }>(`select quote_ident(records_partition_create($1, $2)) as t`, [datasetId, n]);
  return r.rows[0]!.t;
}

/** Attaches a partition made by `createRecordPartition`; its check constraint spares PostgreSQL a scan of its rows. */
export async function attachRecordPartition(client: pg.ClientBase, datasetId: string, n: number): Promise<void> {
  await client.query(`select records_partition_attach($1, $2)`, [datasetId, n]);
}

/** The partition's quoted name, created and attached when missing. */
export async function ensureRecordPartition(client: pg.ClientBase, datasetId: string, n: number): Promise<string> {
  const r = await client.query<{ t: string }>(`select quote_ident(records_partition($1, $2)) as t`, [datasetId, n]);
  return r.rows[0]!.t;
}
