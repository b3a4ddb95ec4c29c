-- 001_initial: the whole first schema. Applied inside one transaction by server/store/migrate.ts.
-- Immutability is enforced here as well as in code: raw files, fits, events and the audit log are
-- append-only (triggers refuse the forbidden UPDATE/DELETE), so a bug or a hand-typed SQL
-- statement cannot quietly rewrite history.

CREATE TABLE sites (
  id          INTEGER PRIMARY KEY,
  name        TEXT NOT NULL UNIQUE,
  created_at  TEXT NOT NULL
);

CREATE TABLE vessels (
  id          INTEGER PRIMARY KEY,
  site_id     INTEGER NOT NULL REFERENCES sites(id),
  name        TEXT NOT NULL,
  -- the vessel file exactly as accepted (JSON), plus the parts queried on their own
  spec        TEXT NOT NULL CHECK (json_valid(spec)),
  shape       TEXT NOT NULL CHECK (json_valid(shape)),
  fluid       TEXT CHECK (fluid IS NULL OR json_valid(fluid)),
  sensor      TEXT CHECK (sensor IS NULL OR json_valid(sensor)),
  revision    INTEGER NOT NULL DEFAULT 1,
  created_at  TEXT NOT NULL,
  updated_at  TEXT NOT NULL,
  UNIQUE (site_id, name)
);

CREATE TABLE outlets (
  id                INTEGER PRIMARY KEY,
  vessel_id         INTEGER NOT NULL REFERENCES vessels(id),
  -- the outlet's name inside its vessel file ("main" when the file has a single unnamed outlet)
  key               TEXT NOT NULL,
  type              TEXT,
  bore_m            REAL,
  bore_tolerance_m  REAL,
  elevation_m       REAL,
  -- the baseline effective area times this factor is the action threshold: < 1 fouling, > 1 erosion
  action_threshold  REAL CHECK (action_threshold IS NULL OR (action_threshold > 0 AND action_threshold < 2 AND action_threshold <> 1)),
  spec              TEXT NOT NULL CHECK (json_valid(spec)),
  -- outlets are never deleted (tests point at them); one dropped from the vessel file is retired
  retired_at        TEXT,
  UNIQUE (vessel_id, key)
);

-- Raw logger files, content-addressed by SHA-256 inside the database (see server/store/README.md).
CREATE TABLE raw_files (
  sha256      TEXT PRIMARY KEY CHECK (length(sha256) = 64),
  size        INTEGER NOT NULL,
  bytes       BLOB NOT NULL,
  created_at  TEXT NOT NULL
);

CREATE TRIGGER raw_files_no_update BEFORE UPDATE ON raw_files
BEGIN SELECT RAISE(ABORT, 'raw files are immutable'); END;

CREATE TABLE drain_tests (
  id            INTEGER PRIMARY KEY,
  vessel_id     INTEGER NOT NULL REFERENCES vessels(id),
  outlet_id     INTEGER REFERENCES outlets(id),
  log_sha256    TEXT NOT NULL REFERENCES raw_files(sha256),
  log_name      TEXT NOT NULL,
  baro_sha256   TEXT REFERENCES raw_files(sha256),
  baro_name     TEXT,
  settings      TEXT NOT NULL CHECK (json_valid(settings)),
  detected      TEXT CHECK (detected IS NULL OR json_valid(detected)),
  -- pending: bytes stored, not analysed yet; analysed: a first fit exists
  status        TEXT NOT NULL CHECK (status IN ('pending', 'analysed')),
  operator      TEXT,
  logger_id     TEXT,
  tested_at     TEXT,
  notes         TEXT,
  created_by    INTEGER REFERENCES users(id),
  created_at    TEXT NOT NULL
);
CREATE INDEX drain_tests_vessel ON drain_tests (vessel_id, id);

-- A test's identity and bytes never change; only pending → analysed (with what was detected).
CREATE TRIGGER drain_tests_immutable BEFORE UPDATE ON drain_tests
WHEN NOT (OLD.status = 'pending' AND NEW.status = 'analysed')
  OR NEW.id IS NOT OLD.id OR NEW.vessel_id IS NOT OLD.vessel_id OR NEW.outlet_id IS NOT OLD.outlet_id
  OR NEW.log_sha256 IS NOT OLD.log_sha256 OR NEW.log_name IS NOT OLD.log_name
  OR NEW.baro_sha256 IS NOT OLD.baro_sha256 OR NEW.baro_name IS NOT OLD.baro_name
  OR NEW.settings IS NOT OLD.settings OR NEW.operator IS NOT OLD.operator
  OR NEW.logger_id IS NOT OLD.logger_id OR NEW.tested_at IS NOT OLD.tested_at
  OR NEW.notes IS NOT OLD.notes OR NEW.created_by IS NOT OLD.created_by
  OR NEW.created_at IS NOT OLD.created_at
BEGIN SELECT RAISE(ABORT, 'drain tests are immutable once analysed'); END;

-- Only a test whose analysis refused it (still pending) may be withdrawn.
CREATE TRIGGER drain_tests_no_delete BEFORE DELETE ON drain_tests
WHEN OLD.status <> 'pending'
BEGIN SELECT RAISE(ABORT, 'analysed drain tests cannot be deleted'); END;

CREATE TABLE fits (
  id              INTEGER PRIMARY KEY,
  test_id         INTEGER NOT NULL REFERENCES drain_tests(id),
  vessel_id       INTEGER NOT NULL REFERENCES vessels(id),
  outlet_id       INTEGER REFERENCES outlets(id),
  settings        TEXT NOT NULL CHECK (json_valid(settings)),
  -- the vessel file the fit was computed with (the vessel may be edited later)
  vessel_spec     TEXT NOT NULL CHECK (json_valid(vessel_spec)),
  result          TEXT NOT NULL CHECK (json_valid(result)),
  engine_version  TEXT NOT NULL,
  -- copies of two result numbers so trends can be read without parsing every result
  cda_m2          REAL,
  cd              REAL,
  status          TEXT NOT NULL DEFAULT 'draft' CHECK (status IN ('draft', 'approved', 'rejected')),
  superseded_by   INTEGER REFERENCES fits(id),
  review_comment  TEXT,
  reviewed_by     INTEGER REFERENCES users(id),
  reviewed_at     TEXT,
  created_by      INTEGER REFERENCES users(id),
  created_at      TEXT NOT NULL
);
CREATE INDEX fits_vessel ON fits (vessel_id, id);
CREATE INDEX fits_test ON fits (test_id, id);

CREATE TRIGGER fits_no_delete BEFORE DELETE ON fits
BEGIN SELECT RAISE(ABORT, 'fits are never deleted'); END;

-- What was computed never changes. A review happens once (draft → approved | rejected);
-- superseded_by is set once.
CREATE TRIGGER fits_immutable BEFORE UPDATE ON fits
WHEN NEW.id IS NOT OLD.id OR NEW.test_id IS NOT OLD.test_id OR NEW.vessel_id IS NOT OLD.vessel_id
  OR NEW.outlet_id IS NOT OLD.outlet_id OR NEW.settings IS NOT OLD.settings
  OR NEW.vessel_spec IS NOT OLD.vessel_spec OR NEW.result IS NOT OLD.result OR NEW.engine_version IS NOT OLD.engine_version
  OR NEW.cda_m2 IS NOT OLD.cda_m2 OR NEW.cd IS NOT OLD.cd
  OR NEW.created_by IS NOT OLD.created_by OR NEW.created_at IS NOT OLD.created_at
  OR (NEW.status IS NOT OLD.status AND OLD.status <> 'draft')
  OR (NEW.status IS OLD.status AND (NEW.review_comment IS NOT OLD.review_comment
      OR NEW.reviewed_by IS NOT OLD.reviewed_by OR NEW.reviewed_at IS NOT OLD.reviewed_at))
  OR (NEW.superseded_by IS NOT OLD.superseded_by AND OLD.superseded_by IS NOT NULL)
BEGIN SELECT RAISE(ABORT, 'fits are never overwritten'); END;

CREATE TABLE maintenance_events (
  id           INTEGER PRIMARY KEY,
  vessel_id    INTEGER NOT NULL REFERENCES vessels(id),
  outlet_id    INTEGER REFERENCES outlets(id),
  kind         TEXT NOT NULL CHECK (kind IN ('cleaned', 'replaced', 'modified')),
  occurred_at  TEXT NOT NULL,
  notes        TEXT,
  created_by   INTEGER REFERENCES users(id),
  created_at   TEXT NOT NULL
);
CREATE INDEX maintenance_events_vessel ON maintenance_events (vessel_id, occurred_at);

CREATE TRIGGER maintenance_events_no_update BEFORE UPDATE ON maintenance_events
BEGIN SELECT RAISE(ABORT, 'maintenance events are append-only'); END;
CREATE TRIGGER maintenance_events_no_delete BEFORE DELETE ON maintenance_events
BEGIN SELECT RAISE(ABORT, 'maintenance events are append-only'); END;

CREATE TABLE users (
  id           INTEGER PRIMARY KEY,
  name         TEXT NOT NULL UNIQUE,
  role         TEXT NOT NULL CHECK (role IN ('technician', 'engineer', 'auditor', 'admin')),
  created_at   TEXT NOT NULL,
  disabled_at  TEXT
);

-- Tokens and sessions are kept only as SHA-256 hashes of the secret.
CREATE TABLE api_tokens (
  id          INTEGER PRIMARY KEY,
  user_id     INTEGER NOT NULL REFERENCES users(id),
  name        TEXT NOT NULL,
  token_hash  TEXT NOT NULL UNIQUE CHECK (length(token_hash) = 64),
  created_at  TEXT NOT NULL,
  revoked_at  TEXT
);

CREATE TABLE sessions (
  id_hash     TEXT PRIMARY KEY CHECK (length(id_hash) = 64),
  user_id     INTEGER NOT NULL REFERENCES users(id),
  created_at  TEXT NOT NULL,
  expires_at  TEXT NOT NULL
);

-- Append-only, hash-chained: hash = SHA-256(prev_hash || canonical JSON of the entry).
CREATE TABLE audit_log (
  seq          INTEGER PRIMARY KEY,
  at           TEXT NOT NULL,
  actor_id     INTEGER,
  actor_name   TEXT NOT NULL,
  action       TEXT NOT NULL,
  entity_type  TEXT NOT NULL,
  entity_id    TEXT,
  before       TEXT CHECK (before IS NULL OR json_valid(before)),
  after        TEXT CHECK (after IS NULL OR json_valid(after)),
  prev_hash    TEXT NOT NULL CHECK (length(prev_hash) = 64),
  hash         TEXT NOT NULL UNIQUE CHECK (length(hash) = 64)
);
CREATE INDEX audit_log_entity ON audit_log (entity_type, entity_id, seq);
CREATE INDEX audit_log_actor ON audit_log (actor_id, seq);

CREATE TRIGGER audit_log_no_update BEFORE UPDATE ON audit_log
BEGIN SELECT RAISE(ABORT, 'the audit log is append-only'); END;
CREATE TRIGGER audit_log_no_delete BEFORE DELETE ON audit_log
BEGIN SELECT RAISE(ABORT, 'the audit log is append-only'); END;
