-- 007_vessel_revisions: every revision of every vessel file kept, and the revision each fit used.
-- Filled by triggers on vessels and fits, so whoever writes (API, CLI, demo loader, a script)
-- cannot save a vessel or a fit without its revision being recorded.

CREATE TABLE vessel_revisions (
  vessel_id  INTEGER NOT NULL REFERENCES vessels(id),
  revision   INTEGER NOT NULL,
  -- the vessel file of this revision, exactly as accepted (JSON)
  spec       TEXT NOT NULL CHECK (json_valid(spec)),
  saved_at   TEXT NOT NULL,
  PRIMARY KEY (vessel_id, revision)
);

-- Earlier revisions of vessels made before this migration: from the audit log, whose vessel
-- entries carry the whole stored vessel (its revision and file) as saved.
INSERT INTO vessel_revisions (vessel_id, revision, spec, saved_at)
SELECT id, revision, spec, updated_at FROM vessels;
INSERT OR IGNORE INTO vessel_revisions (vessel_id, revision, spec, saved_at)
SELECT CAST(entity_id AS INTEGER), json_extract(after, '$.revision'), json_extract(after, '$.spec'), at
FROM audit_log
WHERE entity_type = 'vessel' AND action IN ('vessel.create', 'vessel.update')
  AND json_type(after, '$.spec') = 'object' AND json_type(after, '$.revision') = 'integer'
  AND CAST(entity_id AS INTEGER) IN (SELECT id FROM vessels);

CREATE TRIGGER vessel_revisions_no_update BEFORE UPDATE ON vessel_revisions
BEGIN SELECT RAISE(ABORT, 'vessel revisions are never changed'); END;
CREATE TRIGGER vessel_revisions_no_delete BEFORE DELETE ON vessel_revisions
BEGIN SELECT RAISE(ABORT, 'vessel revisions are never deleted'); END;

-- A changed vessel file is a new revision: the old one stays readable.
CREATE TRIGGER vessels_spec_needs_revision BEFORE UPDATE ON vessels
WHEN NEW.spec IS NOT OLD.spec AND NEW.revision <= OLD.revision
BEGIN SELECT RAISE(ABORT, 'a changed vessel file needs a new revision'); END;

CREATE TRIGGER vessels_revision_on_insert AFTER INSERT ON vessels
BEGIN
  INSERT INTO vessel_revisions (vessel_id, revision, spec, saved_at)
  VALUES (NEW.id, NEW.revision, NEW.spec, NEW.created_at);
END;
CREATE TRIGGER vessels_revision_on_update AFTER UPDATE ON vessels
WHEN NEW.revision IS NOT OLD.revision
BEGIN
  INSERT INTO vessel_revisions (vessel_id, revision, spec, saved_at)
  VALUES (NEW.id, NEW.revision, NEW.spec, NEW.updated_at);
END;

-- The vessel revision each fit was computed with: the vessel's revision when the fit is stored
-- (the analysis reads the vessel file just before; see server/store/README.md).
CREATE TABLE fit_vessel_revisions (
  fit_id     INTEGER PRIMARY KEY REFERENCES fits(id),
  vessel_id  INTEGER NOT NULL REFERENCES vessels(id),
  revision   INTEGER NOT NULL
);
CREATE INDEX fit_vessel_revisions_vessel ON fit_vessel_revisions (vessel_id, revision);
-- Fits stored before this migration: the latest revision saved at or before the fit.
INSERT INTO fit_vessel_revisions (fit_id, vessel_id, revision)
SELECT f.id, f.vessel_id, COALESCE(
  (SELECT max(r.revision) FROM vessel_revisions r WHERE r.vessel_id = f.vessel_id AND r.saved_at <= f.created_at),
  (SELECT min(r.revision) FROM vessel_revisions r WHERE r.vessel_id = f.vessel_id), 1)
FROM fits f;

CREATE TRIGGER fits_vessel_revision AFTER INSERT ON fits
BEGIN
  INSERT INTO fit_vessel_revisions (fit_id, vessel_id, revision)
  VALUES (NEW.id, NEW.vessel_id, (SELECT revision FROM vessels WHERE id = NEW.vessel_id));
END;
CREATE TRIGGER fit_vessel_revisions_no_update BEFORE UPDATE ON fit_vessel_revisions
BEGIN SELECT RAISE(ABORT, 'the revision a fit used never changes'); END;
CREATE TRIGGER fit_vessel_revisions_no_delete BEFORE DELETE ON fit_vessel_revisions
BEGIN SELECT RAISE(ABORT, 'the revision a fit used never changes'); END;
