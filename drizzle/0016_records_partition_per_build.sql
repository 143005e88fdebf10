-- Records are partitioned by (dataset_id, valid_from): the rows a build writes for version N of dataset D live in a
-- partition of their own, created in the build's transaction and attached just before it commits. A table created
-- in the loading transaction is what lets PostgreSQL take a bulk COPY cheaply (PostgreSQL manual, "Populating a
-- Database": COPY FREEZE into a table created in the same transaction, and with wal_level = minimal no WAL for it at
-- all); measured on the bench month, the COPY costs PostgreSQL about half as much (DEVELOPERS.md, "Pipeline pacing").
-- Readers still read `records`; a dataset's queries prune to that dataset's partitions.
ALTER TABLE "records" RENAME TO "records_unpartitioned";--> statement-breakpoint
ALTER TABLE "records_unpartitioned" RENAME CONSTRAINT "records_pkey" TO "records_unpartitioned_pkey";--> statement-breakpoint
ALTER TABLE "records_unpartitioned" RENAME CONSTRAINT "records_valid_range_check" TO "records_unpartitioned_valid_range_check";--> statement-breakpoint
CREATE TABLE "records" (LIKE "records_unpartitioned" INCLUDING DEFAULTS) PARTITION BY RANGE ("dataset_id", "valid_from");--> statement-breakpoint
ALTER TABLE "records" ADD CONSTRAINT "records_pkey" PRIMARY KEY ("dataset_id", "platform", "time", "valid_from");--> statement-breakpoint
ALTER TABLE "records" ADD CONSTRAINT "records_valid_range_check" CHECK ("valid_to" IS NULL OR "valid_to" > "valid_from");--> statement-breakpoint
-- The partition of version N of dataset D, by name.
CREATE FUNCTION records_partition_name(d uuid, n integer) RETURNS text LANGUAGE sql IMMUTABLE AS $$
  SELECT 'records_' || replace(d::text, '-', '') || '_' || n
$$;--> statement-breakpoint
-- Creates (not attaches) the partition of version N of dataset D. Its check constraint states the partition's bound,
-- so attaching it needs no scan of its rows. Statement triggers on `records` fire for statements that name
-- `records`; the partition carries the same guards (drizzle/0006_records_released_guard.sql) for statements that
-- name it, so no UPDATE, DELETE or TRUNCATE reaches a released version's rows by either name.
CREATE FUNCTION records_partition_create(d uuid, n integer) RETURNS text LANGUAGE plpgsql AS $$
DECLARE
  t text := records_partition_name(d, n);
BEGIN
  EXECUTE format('CREATE TABLE %I (LIKE records INCLUDING DEFAULTS INCLUDING CONSTRAINTS)', t);
  EXECUTE format('ALTER TABLE %I ADD CONSTRAINT %I CHECK (dataset_id = %L::uuid AND valid_from = %s)', t, t || '_bound', d, n);
  EXECUTE format('ALTER TABLE %I ADD CONSTRAINT %I PRIMARY KEY (dataset_id, platform, "time", valid_from)', t, t || '_pkey');
  EXECUTE format('CREATE TRIGGER records_frozen_update_guard AFTER UPDATE ON %I REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows
    FOR EACH STATEMENT EXECUTE FUNCTION records_frozen_update_guard()', t);
  EXECUTE format('CREATE TRIGGER records_frozen_delete_guard AFTER DELETE ON %I REFERENCING OLD TABLE AS old_rows
    FOR EACH STATEMENT EXECUTE FUNCTION records_frozen_delete_guard()', t);
  EXECUTE format('CREATE TRIGGER records_no_truncate BEFORE TRUNCATE ON %I FOR EACH STATEMENT EXECUTE FUNCTION records_no_truncate()', t);
  RETURN t;
END;
$$;--> statement-breakpoint
CREATE FUNCTION records_partition_attach(d uuid, n integer) RETURNS void LANGUAGE plpgsql AS $$
BEGIN
  EXECUTE format('ALTER TABLE records ATTACH PARTITION %I FOR VALUES FROM (%L, %s) TO (%L, %s)', records_partition_name(d, n), d, n, d, n + 1);
END;
$$;--> statement-breakpoint
-- The partition of version N of dataset D, created and attached when missing (for writers other than a build).
CREATE FUNCTION records_partition(d uuid, n integer) RETURNS text LANGUAGE plpgsql AS $$
BEGIN
  IF to_regclass(quote_ident(records_partition_name(d, n))) IS NULL THEN
    PERFORM records_partition_create(d, n);
    PERFORM records_partition_attach(d, n);
  END IF;
  RETURN records_partition_name(d, n);
END;
$$;--> statement-breakpoint
DO $$
DECLARE
  g record;
  t text;
BEGIN
  FOR g IN SELECT DISTINCT dataset_id, valid_from FROM records_unpartitioned ORDER BY 1, 2 LOOP
    t := records_partition_create(g.dataset_id, g.valid_from);
    EXECUTE format('INSERT INTO %I SELECT * FROM records_unpartitioned WHERE dataset_id = %L::uuid AND valid_from = %s', t, g.dataset_id, g.valid_from);
    PERFORM records_partition_attach(g.dataset_id, g.valid_from);
  END LOOP;
END;
$$;--> statement-breakpoint
DROP TABLE "records_unpartitioned";--> statement-breakpoint
-- The guards of drizzle/0006_records_released_guard.sql, on the new table (statement-level triggers on a partitioned
-- table see the rows of every partition a statement touches).
CREATE TRIGGER records_frozen_update_guard AFTER UPDATE ON records REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows
  FOR EACH STATEMENT EXECUTE FUNCTION records_frozen_update_guard();--> statement-breakpoint
CREATE TRIGGER records_frozen_delete_guard AFTER DELETE ON records REFERENCING OLD TABLE AS old_rows
  FOR EACH STATEMENT EXECUTE FUNCTION records_frozen_delete_guard();--> statement-breakpoint
CREATE TRIGGER records_no_truncate BEFORE TRUNCATE ON records FOR EACH STATEMENT EXECUTE FUNCTION records_no_truncate();
