-- Released data never changes, whoever asks (SECURITY.md "Released versions"). A version that reached
-- released, superseded or retracted keeps every column as it was; the only moves left are
-- released → superseded (a newer release of the same dataset lands in the same transaction) and
-- released/superseded → retracted (its release row is retracted with a reason in the same transaction).
-- Deferred constraint triggers check the pairing at commit, so neither half can happen alone.
-- Nulling a person link (created_by, released_by, retracted_by) is allowed only as the cascaded
-- action of deleting that account (pg_trigger_depth() > 1), never by a direct UPDATE.
CREATE UNIQUE INDEX versions_one_released_per_dataset ON versions (dataset_id) WHERE state = 'released';
--> statement-breakpoint
CREATE FUNCTION tauline_versions_guard() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  frozen text[] := ARRAY['released', 'superseded', 'retracted'];
  old_rest jsonb;
  new_rest jsonb;
BEGIN
  IF TG_OP = 'DELETE' THEN
    IF OLD.state::text = ANY (frozen) THEN
      RAISE EXCEPTION 'version % is % and cannot be deleted', OLD.id, OLD.state USING ERRCODE = 'insufficient_privilege';
    END IF;
    RETURN OLD;
  END IF;

  IF NEW.state = 'released' AND OLD.state <> 'released' THEN
    IF OLD.state <> 'approved' THEN
      RAISE EXCEPTION 'only an approved version can be released (version % is %)', OLD.id, OLD.state USING ERRCODE = 'insufficient_privilege';
    END IF;
    IF NOT EXISTS (SELECT 1 FROM releases r WHERE r.version_id = NEW.id AND r.retracted_at IS NULL) THEN
      RAISE EXCEPTION 'version % can be released only together with its release record', NEW.id USING ERRCODE = 'insufficient_privilege';
    END IF;
  END IF;

  IF NEW.state::text IN ('superseded', 'retracted') AND NOT (OLD.state::text = ANY (frozen)) THEN
    RAISE EXCEPTION 'only a released version can become %', NEW.state USING ERRCODE = 'insufficient_privilege';
  END IF;

  IF OLD.state::text = ANY (frozen) THEN
    old_rest := to_jsonb(OLD) - 'state' - 'state_changed_at';
    new_rest := to_jsonb(NEW) - 'state' - 'state_changed_at';
    IF pg_trigger_depth() > 1 AND NEW.created_by IS NULL THEN
      old_rest := old_rest - 'created_by';
      new_rest := new_rest - 'created_by';
    END IF;
    IF new_rest IS DISTINCT FROM old_rest THEN
      RAISE EXCEPTION 'version % is % and its metadata cannot change', OLD.id, OLD.state USING ERRCODE = 'insufficient_privilege';
    END IF;
    IF NEW.state = OLD.state THEN
      IF NEW.state_changed_at IS DISTINCT FROM OLD.state_changed_at THEN
        RAISE EXCEPTION 'version % is % and cannot change', OLD.id, OLD.state USING ERRCODE = 'insufficient_privilege';
      END IF;
      IF pg_trigger_depth() > 1 THEN
        RETURN NEW;
      END IF;
      RAISE EXCEPTION 'version % is % and cannot change', OLD.id, OLD.state USING ERRCODE = 'insufficient_privilege';
    END IF;
    IF NOT ((OLD.state = 'released' AND NEW.state IN ('superseded', 'retracted')) OR (OLD.state = 'superseded' AND NEW.state = 'retracted')) THEN
      RAISE EXCEPTION 'version % is %; it can only become superseded or retracted', OLD.id, OLD.state USING ERRCODE = 'insufficient_privilege';
    END IF;
  END IF;
  RETURN NEW;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER versions_guard BEFORE UPDATE OR DELETE ON versions
  FOR EACH ROW EXECUTE FUNCTION tauline_versions_guard();
--> statement-breakpoint
CREATE FUNCTION tauline_versions_no_truncate() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF EXISTS (SELECT 1 FROM versions WHERE state IN ('released', 'superseded', 'retracted')) THEN
    RAISE EXCEPTION 'versions holds released data and cannot be truncated' USING ERRCODE = 'insufficient_privilege';
  END IF;
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER versions_no_truncate BEFORE TRUNCATE ON versions
  FOR EACH STATEMENT EXECUTE FUNCTION tauline_versions_no_truncate();
--> statement-breakpoint
-- At commit: a superseded version has a newer live release in its dataset; a retracted one has its release retracted.
CREATE FUNCTION tauline_versions_pairing() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  cur versions%ROWTYPE;
BEGIN
  SELECT * INTO cur FROM versions WHERE id = NEW.id;
  IF cur.state = 'superseded' AND NOT EXISTS (
    SELECT 1 FROM versions v JOIN releases r ON r.version_id = v.id
    WHERE v.dataset_id = cur.dataset_id AND v.state = 'released'
      AND r.release_number > (SELECT release_number FROM releases WHERE version_id = cur.id)
  ) THEN
    RAISE EXCEPTION 'version % can become superseded only when a newer release of its dataset lands', cur.id USING ERRCODE = 'insufficient_privilege';
  END IF;
  IF cur.state = 'retracted' AND NOT EXISTS (SELECT 1 FROM releases r WHERE r.version_id = cur.id AND r.retracted_at IS NOT NULL) THEN
    RAISE EXCEPTION 'version % can be retracted only together with its release record', cur.id USING ERRCODE = 'insufficient_privilege';
  END IF;
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER versions_pairing AFTER UPDATE OF state ON versions DEFERRABLE INITIALLY DEFERRED
  FOR EACH ROW WHEN (OLD.state IS DISTINCT FROM NEW.state AND NEW.state IN ('superseded', 'retracted'))
  EXECUTE FUNCTION tauline_versions_pairing();
--> statement-breakpoint
CREATE FUNCTION tauline_releases_guard() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  old_rest jsonb;
  new_rest jsonb;
BEGIN
  IF TG_OP = 'DELETE' THEN
    RAISE EXCEPTION 'release % is permanent; retract it instead', OLD.id USING ERRCODE = 'insufficient_privilege';
  END IF;
  IF TG_OP = 'INSERT' THEN
    IF NEW.retracted_at IS NOT NULL OR NOT EXISTS (
      SELECT 1 FROM versions v WHERE v.id = NEW.version_id AND v.dataset_id = NEW.dataset_id AND v.number = NEW.version_number AND v.state = 'approved'
    ) THEN
      RAISE EXCEPTION 'a release needs an approved version of the same dataset' USING ERRCODE = 'insufficient_privilege';
    END IF;
    RETURN NEW;
  END IF;
  old_rest := to_jsonb(OLD) - 'retracted_at' - 'retracted_by' - 'retraction_reason';
  new_rest := to_jsonb(NEW) - 'retracted_at' - 'retracted_by' - 'retraction_reason';
  IF pg_trigger_depth() > 1 THEN
    -- Deleting an account nulls its person links; nothing else may move.
    IF NEW.released_by IS NULL THEN
      old_rest := old_rest - 'released_by';
      new_rest := new_rest - 'released_by';
    END IF;
    IF new_rest IS NOT DISTINCT FROM old_rest AND NEW.retracted_at IS NOT DISTINCT FROM OLD.retracted_at
       AND NEW.retraction_reason IS NOT DISTINCT FROM OLD.retraction_reason
       AND (NEW.retracted_by IS NOT DISTINCT FROM OLD.retracted_by OR NEW.retracted_by IS NULL) THEN
      RETURN NEW;
    END IF;
  END IF;
  IF OLD.retracted_at IS NOT NULL THEN
    RAISE EXCEPTION 'release % was retracted and cannot change', OLD.id USING ERRCODE = 'insufficient_privilege';
  END IF;
  IF NEW.retracted_at IS NULL OR new_rest IS DISTINCT FROM old_rest THEN
    RAISE EXCEPTION 'release % cannot change; only a retraction with a reason is allowed', OLD.id USING ERRCODE = 'insufficient_privilege';
  END IF;
  RETURN NEW;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER releases_guard BEFORE INSERT OR UPDATE OR DELETE ON releases
  FOR EACH ROW EXECUTE FUNCTION tauline_releases_guard();
--> statement-breakpoint
CREATE FUNCTION tauline_refuse_truncate() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION '% is permanent and cannot be truncated', TG_TABLE_NAME USING ERRCODE = 'insufficient_privilege';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER releases_no_truncate BEFORE TRUNCATE ON releases
  FOR EACH STATEMENT EXECUTE FUNCTION tauline_refuse_truncate();
--> statement-breakpoint
-- At commit: a new release row belongs to a version that is released; a retracted one to a retracted version.
CREATE FUNCTION tauline_releases_pairing() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  st text;
BEGIN
  SELECT state::text INTO st FROM versions WHERE id = NEW.version_id;
  IF TG_OP = 'INSERT' AND st <> 'released' THEN
    RAISE EXCEPTION 'release % was recorded but its version is %, not released', NEW.id, st USING ERRCODE = 'insufficient_privilege';
  END IF;
  IF TG_OP = 'UPDATE' AND NEW.retracted_at IS NOT NULL AND st <> 'retracted' THEN
    RAISE EXCEPTION 'release % was retracted but its version is %', NEW.id, st USING ERRCODE = 'insufficient_privilege';
  END IF;
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER releases_pairing AFTER INSERT OR UPDATE ON releases DEFERRABLE INITIALLY DEFERRED
  FOR EACH ROW EXECUTE FUNCTION tauline_releases_pairing();
--> statement-breakpoint
-- Checksums are written once per file and never edited; nothing is added to a retracted release.
CREATE FUNCTION tauline_release_files_guard() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN
    IF NOT EXISTS (SELECT 1 FROM releases r WHERE r.id = NEW.release_id AND r.retracted_at IS NULL) THEN
      RAISE EXCEPTION 'files can be added only to a release that is not retracted' USING ERRCODE = 'insufficient_privilege';
    END IF;
    RETURN NEW;
  END IF;
  RAISE EXCEPTION 'release files are permanent (% refused)', TG_OP USING ERRCODE = 'insufficient_privilege';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER release_files_guard BEFORE INSERT OR UPDATE OR DELETE ON release_files
  FOR EACH ROW EXECUTE FUNCTION tauline_release_files_guard();
--> statement-breakpoint
CREATE TRIGGER release_files_no_truncate BEFORE TRUNCATE ON release_files
  FOR EACH STATEMENT EXECUTE FUNCTION tauline_refuse_truncate();
--> statement-breakpoint
-- Decisions are history: appended, never edited.
CREATE FUNCTION tauline_reviews_append_only() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'UPDATE' AND pg_trigger_depth() > 1 AND NEW.reviewer_id IS NULL
     AND (to_jsonb(NEW) - 'reviewer_id') = (to_jsonb(OLD) - 'reviewer_id') THEN
    RETURN NEW;
  END IF;
  RAISE EXCEPTION 'reviews are append-only (% refused)', TG_OP USING ERRCODE = 'insufficient_privilege';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER reviews_append_only BEFORE UPDATE OR DELETE ON reviews
  FOR EACH ROW EXECUTE FUNCTION tauline_reviews_append_only();
--> statement-breakpoint
CREATE TRIGGER reviews_no_truncate BEFORE TRUNCATE ON reviews
  FOR EACH STATEMENT EXECUTE FUNCTION tauline_refuse_truncate();
