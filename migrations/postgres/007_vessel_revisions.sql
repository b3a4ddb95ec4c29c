-- 007_vessel_revisions (PostgreSQL 15): the same as migrations/007_vessel_revisions.sql. Every
-- revision of every vessel file kept, and the revision each fit used, filled by triggers.
-- efflux_json_valid() and efflux_refuse() come from 001_initial.

CREATE TABLE vessel_revisions (
  vessel_id  BIGINT NOT NULL REFERENCES vessels(id),
  revision   INTEGER NOT NULL,
  spec       TEXT NOT NULL CHECK (efflux_json_valid(spec)),
  saved_at   TEXT NOT NULL,
  PRIMARY KEY (vessel_id, revision)
);

INSERT INTO vessel_revisions (vessel_id, revision, spec, saved_at)
SELECT id, revision, spec, updated_at FROM vessels;
-- Earlier revisions from the audit log (its vessel entries carry the stored vessel as saved).
INSERT INTO vessel_revisions (vessel_id, revision, spec, saved_at)
SELECT CAST(a.entity_id AS BIGINT), CAST(a.after::json->>'revision' AS INTEGER), a.after::json->>'spec', a.at
FROM audit_log a
WHERE a.entity_type = 'vessel' AND a.action IN ('vessel.create', 'vessel.update')
  AND json_typeof(a.after::json->'spec') = 'object' AND json_typeof(a.after::json->'revision') = 'number'
  AND a.entity_id ~ '^[0-9]+$' AND CAST(a.entity_id AS BIGINT) IN (SELECT id FROM vessels)
ON CONFLICT DO NOTHING;

CREATE TRIGGER vessel_revisions_no_update BEFORE UPDATE ON vessel_revisions
FOR EACH ROW EXECUTE FUNCTION efflux_refuse('vessel revisions are never changed');
CREATE TRIGGER vessel_revisions_no_delete BEFORE DELETE ON vessel_revisions
FOR EACH ROW EXECUTE FUNCTION efflux_refuse('vessel revisions are never deleted');

CREATE TRIGGER vessels_spec_needs_revision BEFORE UPDATE ON vessels
FOR EACH ROW WHEN (NEW.spec IS DISTINCT FROM OLD.spec AND NEW.revision <= OLD.revision)
EXECUTE FUNCTION efflux_refuse('a changed vessel file needs a new revision');

CREATE FUNCTION efflux_vessel_revision_saved() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  INSERT INTO vessel_revisions (vessel_id, revision, spec, saved_at)
  VALUES (NEW.id, NEW.revision, NEW.spec,
          CASE WHEN TG_OP = 'INSERT' THEN NEW.created_at ELSE NEW.updated_at END);
  RETURN NULL;
END $$;
CREATE TRIGGER vessels_revision_on_insert AFTER INSERT ON vessels
FOR EACH ROW EXECUTE FUNCTION efflux_vessel_revision_saved();
CREATE TRIGGER vessels_revision_on_update AFTER UPDATE ON vessels
FOR EACH ROW WHEN (NEW.revision IS DISTINCT FROM OLD.revision)
EXECUTE FUNCTION efflux_vessel_revision_saved();

CREATE TABLE fit_vessel_revisions (
  fit_id     BIGINT PRIMARY KEY REFERENCES fits(id),
  vessel_id  BIGINT NOT NULL REFERENCES vessels(id),
  revision   INTEGER NOT NULL
);
CREATE INDEX fit_vessel_revisions_vessel ON fit_vessel_revisions (vessel_id, revision);
INSERT INTO fit_vessel_revisions (fit_id, vessel_id, revision)
SELECT f.id, f.vessel_id, COALESCE(
  (SELECT max(r.revision) FROM vessel_revisions r WHERE r.vessel_id = f.vessel_id AND r.saved_at <= f.created_at),
  (SELECT min(r.revision) FROM vessel_revisions r WHERE r.vessel_id = f.vessel_id), 1)
FROM fits f;

CREATE FUNCTION efflux_fit_vessel_revision() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  INSERT INTO fit_vessel_revisions (fit_id, vessel_id, revision)
  VALUES (NEW.id, NEW.vessel_id, (SELECT revision FROM vessels WHERE id = NEW.vessel_id));
  RETURN NULL;
END $$;
CREATE TRIGGER fits_vessel_revision AFTER INSERT ON fits
FOR EACH ROW EXECUTE FUNCTION efflux_fit_vessel_revision();
CREATE TRIGGER fit_vessel_revisions_no_update BEFORE UPDATE ON fit_vessel_revisions
FOR EACH ROW EXECUTE FUNCTION efflux_refuse('the revision a fit used never changes');
CREATE TRIGGER fit_vessel_revisions_no_delete BEFORE DELETE ON fit_vessel_revisions
FOR EACH ROW EXECUTE FUNCTION efflux_refuse('the revision a fit used never changes');
