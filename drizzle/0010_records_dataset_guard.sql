-- records.dataset_id has no foreign key (a per-row check would dominate a bulk COPY); this keeps the same promise
-- for deletes: a dataset that still has records cannot be deleted.
CREATE FUNCTION datasets_records_guard() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF EXISTS (SELECT 1 FROM records r JOIN old_rows o ON r.dataset_id = o.id) THEN
    RAISE EXCEPTION 'a dataset with records cannot be deleted' USING ERRCODE = 'foreign_key_violation';
  END IF;
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER datasets_records_guard AFTER DELETE ON datasets REFERENCING OLD TABLE AS old_rows
  FOR EACH STATEMENT EXECUTE FUNCTION datasets_records_guard();
