-- 009_joint_fits: joint fits of connected vessels kept as records, like single fits (issue 17).
-- A joint fit keeps the system file and every log exactly as received (their own content-addressed
-- table: raw_files rows may be deleted when a refused drain-test upload is withdrawn), the settings,
-- the one fit-result shape and the thinned curves for charts. Draft → approved | rejected once.

CREATE TABLE joint_fit_bytes (
  sha256      TEXT PRIMARY KEY CHECK (length(sha256) = 64),
  size        INTEGER NOT NULL,
  bytes       BLOB NOT NULL,
  created_at  TEXT NOT NULL
);

CREATE TRIGGER joint_fit_bytes_no_update BEFORE UPDATE ON joint_fit_bytes
BEGIN SELECT RAISE(ABORT, 'stored files are immutable'); END;
CREATE TRIGGER joint_fit_bytes_no_delete BEFORE DELETE ON joint_fit_bytes
BEGIN SELECT RAISE(ABORT, 'stored files are never deleted'); END;

CREATE TABLE joint_fits (
  id                INTEGER PRIMARY KEY,
  site_id           INTEGER NOT NULL REFERENCES sites(id),
  -- the system file's "name": fits of one system are listed together
  system_name       TEXT NOT NULL,
  settings          TEXT NOT NULL CHECK (json_valid(settings)),
  result            TEXT NOT NULL CHECK (json_valid(result)),
  -- each log thinned for charts, with the fitted curve (derived from result and the logs)
  drawing           TEXT NOT NULL CHECK (json_valid(drawing)),
  engine_version    TEXT NOT NULL,
  notes             TEXT,
  status            TEXT NOT NULL DEFAULT 'draft' CHECK (status IN ('draft', 'approved', 'rejected')),
  created_by        INTEGER REFERENCES users(id),
  created_at        TEXT NOT NULL,
  review_comment    TEXT,
  reviewed_by       INTEGER REFERENCES users(id),
  reviewed_at       TEXT
);
CREATE INDEX joint_fits_system ON joint_fits (site_id, system_name, id);

CREATE TRIGGER joint_fits_no_delete BEFORE DELETE ON joint_fits
BEGIN SELECT RAISE(ABORT, 'joint fits are never deleted'); END;

-- What was computed never changes; a review happens once (draft → approved | rejected).
CREATE TRIGGER joint_fits_immutable BEFORE UPDATE ON joint_fits
WHEN NEW.id IS NOT OLD.id OR NEW.site_id IS NOT OLD.site_id OR NEW.system_name IS NOT OLD.system_name
  OR NEW.settings IS NOT OLD.settings OR NEW.result IS NOT OLD.result OR NEW.drawing IS NOT OLD.drawing
  OR NEW.engine_version IS NOT OLD.engine_version OR NEW.notes IS NOT OLD.notes
  OR NEW.created_by IS NOT OLD.created_by OR NEW.created_at IS NOT OLD.created_at
  OR OLD.status <> 'draft' OR NEW.status = 'draft'
BEGIN SELECT RAISE(ABORT, 'joint fits are never overwritten'); END;

-- The files of one joint fit: the system file, one level log per vessel, one flow log per logged inflow.
CREATE TABLE joint_fit_files (
  joint_fit_id  INTEGER NOT NULL REFERENCES joint_fits(id),
  role          TEXT NOT NULL CHECK (role IN ('system', 'level', 'inflow')),
  -- the vessel's id in the system file ('' for the system file)
  vessel        TEXT NOT NULL,
  file_name     TEXT NOT NULL,
  sha256        TEXT NOT NULL REFERENCES joint_fit_bytes(sha256),
  PRIMARY KEY (joint_fit_id, role, vessel)
);

CREATE TRIGGER joint_fit_files_no_update BEFORE UPDATE ON joint_fit_files
BEGIN SELECT RAISE(ABORT, 'joint fit files are never changed'); END;
CREATE TRIGGER joint_fit_files_no_delete BEFORE DELETE ON joint_fit_files
BEGIN SELECT RAISE(ABORT, 'joint fit files are never deleted'); END;
