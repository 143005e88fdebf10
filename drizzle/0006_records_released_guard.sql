-- Records of a released version never change (PRODUCT.md: "released ones never change, enforced in the database").
-- A row belongs to version V when valid_from <= V < coalesce(valid_to, infinity). A frozen version F (released,
-- superseded or retracted) must keep seeing exactly the same rows with the same contents, so:
--  * UPDATE may touch a row some frozen version sees (before or after) only to move valid_to so that no frozen
--    version's view changes: closing a row at N > F keeps it in F; closing it at N <= F is refused.
--  * DELETE is refused for a row any frozen version sees; TRUNCATE is refused outright.
-- Statement-level triggers with transition tables check a bulk close of millions of rows in one set-based query.
CREATE FUNCTION records_frozen_update_guard() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  frozen int;
BEGIN
  SELECT v.number INTO frozen
  FROM old_rows o
  FULL JOIN new_rows n ON n.dataset_id = o.dataset_id AND n.platform = o.platform AND n.time = o.time AND n.valid_from = o.valid_from
  JOIN versions v ON v.dataset_id = coalesce(o.dataset_id, n.dataset_id) AND v.state IN ('released', 'superseded', 'retracted')
  WHERE ((o.dataset_id IS NOT NULL AND o.valid_from <= v.number AND (o.valid_to IS NULL OR v.number < o.valid_to))
      OR (n.dataset_id IS NOT NULL AND n.valid_from <= v.number AND (n.valid_to IS NULL OR v.number < n.valid_to)))
    AND (o.dataset_id IS NULL OR n.dataset_id IS NULL
      OR (o.valid_from <= v.number AND (o.valid_to IS NULL OR v.number < o.valid_to))
         IS DISTINCT FROM (n.valid_from <= v.number AND (n.valid_to IS NULL OR v.number < n.valid_to))
      OR (to_jsonb(o) - 'valid_to') IS DISTINCT FROM (to_jsonb(n) - 'valid_to'))
  LIMIT 1;
  IF frozen IS NOT NULL THEN
    RAISE EXCEPTION 'records of released version % cannot be changed', frozen USING ERRCODE = 'integrity_constraint_violation';
  END IF;
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER records_frozen_update_guard AFTER UPDATE ON records REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows
  FOR EACH STATEMENT EXECUTE FUNCTION records_frozen_update_guard();
--> statement-breakpoint
CREATE FUNCTION records_frozen_delete_guard() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  frozen int;
BEGIN
  SELECT v.number INTO frozen
  FROM old_rows o
  JOIN versions v ON v.dataset_id = o.dataset_id AND v.state IN ('released', 'superseded', 'retracted')
  WHERE o.valid_from <= v.number AND (o.valid_to IS NULL OR v.number < o.valid_to)
  LIMIT 1;
  IF frozen IS NOT NULL THEN
    RAISE EXCEPTION 'records of released version % cannot be deleted', frozen USING ERRCODE = 'integrity_constraint_violation';
  END IF;
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER records_frozen_delete_guard AFTER DELETE ON records REFERENCING OLD TABLE AS old_rows
  FOR EACH STATEMENT EXECUTE FUNCTION records_frozen_delete_guard();
--> statement-breakpoint
CREATE FUNCTION records_no_truncate() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'records cannot be truncated' USING ERRCODE = 'integrity_constraint_violation';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER records_no_truncate BEFORE TRUNCATE ON records FOR EACH STATEMENT EXECUTE FUNCTION records_no_truncate();
