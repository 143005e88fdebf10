-- A version can enter the released family only through a release: inserting a row that is already
-- released, superseded or retracted needs its release row by commit (the same pairing as for updates),
-- so no released version exists without its citation, licence and checksums.
CREATE FUNCTION tauline_versions_insert_pairing() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF NOT EXISTS (SELECT 1 FROM releases r WHERE r.version_id = NEW.id) THEN
    RAISE EXCEPTION 'version % cannot be created as %; release an approved version instead', NEW.id, NEW.state USING ERRCODE = 'insufficient_privilege';
  END IF;
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER versions_insert_pairing AFTER INSERT ON versions DEFERRABLE INITIALLY DEFERRED
  FOR EACH ROW WHEN (NEW.state IN ('released', 'superseded', 'retracted'))
  EXECUTE FUNCTION tauline_versions_insert_pairing();
