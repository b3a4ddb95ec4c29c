-- 005_live_tests (PostgreSQL 15): the same as migrations/005_live_tests.sql.
-- Live drain tests: a test opened before the valve opens and fed rows while it runs. The received
-- bytes are kept here piece by piece (each committed before it is acknowledged to the sender), so
-- a service restart loses nothing; closing stores them as an ordinary upload and drops the pieces.
CREATE TABLE live_tests (
  id             TEXT PRIMARY KEY,
  vessel_id      BIGINT NOT NULL REFERENCES vessels(id),
  outlet_id      BIGINT,
  file_name      TEXT NOT NULL,
  -- JSON: settings, target, operator, loggerId, notes
  request        TEXT NOT NULL,
  opened_by_id   BIGINT,
  opened_by      TEXT NOT NULL,
  opened_at      TEXT NOT NULL,
  status         TEXT NOT NULL DEFAULT 'open' CHECK (status IN ('open', 'closed', 'abandoned')),
  test_id        BIGINT,
  received_bytes BIGINT NOT NULL DEFAULT 0
);

CREATE TABLE live_test_pieces (
  live_id      TEXT NOT NULL REFERENCES live_tests(id) ON DELETE CASCADE,
  offset_bytes BIGINT NOT NULL,
  bytes        BYTEA NOT NULL,
  PRIMARY KEY (live_id, offset_bytes)
);
