-- Operations: what the data folder is (demo or real) and analyses that failed for a reason other
-- than the input (timeouts, a worker fault, a full disk), so a test that keeps failing is marked.

-- One row per fact about this database. 'purpose' is 'demo' when the invented scenario was loaded
-- into it (set once, in the transaction that marks the folder; never changed afterwards).
CREATE TABLE service_meta (
  key    TEXT PRIMARY KEY,
  value  TEXT NOT NULL,
  set_at TEXT NOT NULL
);
CREATE TRIGGER service_meta_no_update BEFORE UPDATE ON service_meta
BEGIN SELECT RAISE(ABORT, 'service facts are written once'); END;

-- Append-only while the test exists; a withdrawn pending test takes its failures with it.
CREATE TABLE analysis_failures (
  id        INTEGER PRIMARY KEY,
  test_id   INTEGER NOT NULL REFERENCES drain_tests(id) ON DELETE CASCADE,
  failed_at TEXT NOT NULL,
  reason    TEXT NOT NULL
);
CREATE INDEX analysis_failures_test ON analysis_failures (test_id, id);
CREATE TRIGGER analysis_failures_no_update BEFORE UPDATE ON analysis_failures
BEGIN SELECT RAISE(ABORT, 'analysis failures are append-only'); END;
