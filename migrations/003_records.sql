-- 003_records: records a site can trust (issue 12).
-- 1. One test date. drain_tests.tested_at is THE date of a test (UTC, ISO 8601): the date the
--    person stated, else the time of the first reading of the first fit's window on the log's own
--    clock; tested_at_source says which. Existing tests without a usable date get it from their
--    stored log (the first fit's window.startTime) where it has one; the others are listed in
--    undated_tests, which `efflux serve` and `efflux audit verify` report.
-- 2. Sites carry the self-review setting (four eyes, unless an admin allows self-review).
-- 3. People: optional site limits (user_sites), sessions know the token they were opened with
--    (revoking the token ends them), idempotency keys of uploads.

-- The trigger of 001 forbids every change to a test but pending → analysed; it is replaced below.
DROP TRIGGER drain_tests_immutable;

ALTER TABLE drain_tests ADD COLUMN tested_at_source TEXT CHECK (tested_at_source IS NULL OR tested_at_source IN ('stated', 'log'));

-- Stated dates SQLite can read are kept verbatim (reports already issued quote them and must verify).
UPDATE drain_tests SET tested_at_source = 'stated'
WHERE tested_at IS NOT NULL AND strftime('%s', tested_at) IS NOT NULL;

-- What could not be dated, with the reason (the original text stays in the test.upload audit entry).
CREATE TABLE undated_tests (
  test_id  INTEGER PRIMARY KEY REFERENCES drain_tests(id),
  reason   TEXT NOT NULL
);

-- The rest from their stored log: the first fit's window start, on the log's own clock, in UTC.
UPDATE drain_tests SET
  tested_at = (SELECT json_extract(f.result, '$.window.startTime') FROM fits f WHERE f.test_id = drain_tests.id ORDER BY f.id LIMIT 1),
  tested_at_source = 'log'
WHERE tested_at_source IS NULL
  AND (SELECT json_extract(f.result, '$.window.startTime') FROM fits f WHERE f.test_id = drain_tests.id ORDER BY f.id LIMIT 1) IS NOT NULL;

-- Logs in elapsed time whose preamble states when logging started ("Started: 2024-10-07T08:00:00Z"):
-- that start plus the first fit's window offset (server/core/analysis/test-date.ts, logTestDate).
UPDATE drain_tests SET
  tested_at = (SELECT strftime('%Y-%m-%dT%H:%M:%fZ', json_extract(m.value, '$.value'),
                 printf('%+.3f seconds', (SELECT json_extract(f.result, '$.window.startS') FROM fits f WHERE f.test_id = drain_tests.id ORDER BY f.id LIMIT 1)))
               FROM json_each(drain_tests.detected, '$.metadata') m
               WHERE lower(trim(json_extract(m.value, '$.key'))) IN ('start', 'started', 'start time', 'started at', 'start date', 'test start', 'test started', 'logging started', 'log start')
                 AND trim(json_extract(m.value, '$.value')) GLOB '[0-9][0-9][0-9][0-9]-[0-9][0-9]-[0-9][0-9][T ][0-9][0-9]:[0-9][0-9]*[Z+-]*'
               LIMIT 1),
  tested_at_source = 'log'
WHERE tested_at_source IS NULL AND detected IS NOT NULL AND json_valid(detected)
  AND (SELECT 1 FROM json_each(drain_tests.detected, '$.metadata') m
       WHERE lower(trim(json_extract(m.value, '$.key'))) IN ('start', 'started', 'start time', 'started at', 'start date', 'test start', 'test started', 'logging started', 'log start')
         AND trim(json_extract(m.value, '$.value')) GLOB '[0-9][0-9][0-9][0-9]-[0-9][0-9]-[0-9][0-9][T ][0-9][0-9]:[0-9][0-9]*[Z+-]*') IS NOT NULL
  AND EXISTS (SELECT 1 FROM fits f WHERE f.test_id = drain_tests.id);

INSERT INTO undated_tests (test_id, reason)
SELECT id, CASE WHEN tested_at IS NULL THEN 'no date was stated and its log has only elapsed time'
                ELSE 'the stated date "' || tested_at || '" is not a date, and its log has only elapsed time' END
FROM drain_tests WHERE tested_at_source IS NULL AND status = 'analysed';
UPDATE drain_tests SET tested_at = NULL WHERE tested_at_source IS NULL AND status = 'analysed';

-- A test's identity and bytes never change; only pending → analysed, when an undated test also
-- receives its date from the log (once).
CREATE TRIGGER drain_tests_immutable BEFORE UPDATE ON drain_tests
WHEN NOT (OLD.status = 'pending' AND NEW.status = 'analysed')
  OR NEW.id IS NOT OLD.id OR NEW.vessel_id IS NOT OLD.vessel_id OR NEW.outlet_id IS NOT OLD.outlet_id
  OR NEW.log_sha256 IS NOT OLD.log_sha256 OR NEW.log_name IS NOT OLD.log_name
  OR NEW.baro_sha256 IS NOT OLD.baro_sha256 OR NEW.baro_name IS NOT OLD.baro_name
  OR NEW.settings IS NOT OLD.settings OR NEW.operator IS NOT OLD.operator
  OR NEW.logger_id IS NOT OLD.logger_id
  OR (NEW.tested_at IS NOT OLD.tested_at AND OLD.tested_at IS NOT NULL)
  OR (NEW.tested_at_source IS NOT OLD.tested_at_source AND OLD.tested_at_source IS NOT NULL)
  OR NEW.notes IS NOT OLD.notes OR NEW.created_by IS NOT OLD.created_by
  OR NEW.created_at IS NOT OLD.created_at
BEGIN SELECT RAISE(ABORT, 'drain tests are immutable once analysed'); END;

-- Duplicates: the same bytes for the same vessel are found by this index.
CREATE INDEX drain_tests_log ON drain_tests (vessel_id, log_sha256);

-- Four eyes: 1 lets the person who uploaded a test or asked for a refit approve it (marked).
ALTER TABLE sites ADD COLUMN self_review_allowed INTEGER NOT NULL DEFAULT 0 CHECK (self_review_allowed IN (0, 1));

-- A person limited to sites acts on those sites' vessels only; no row = every site.
CREATE TABLE user_sites (
  user_id  INTEGER NOT NULL REFERENCES users(id),
  site_id  INTEGER NOT NULL REFERENCES sites(id),
  PRIMARY KEY (user_id, site_id)
);

-- The token a session was opened with: revoking the token ends its sessions.
ALTER TABLE sessions ADD COLUMN token_id INTEGER REFERENCES api_tokens(id);

-- Idempotency-Key of uploads, per person: a retry answers the first result. A refused upload is
-- withdrawn (its test deleted), and its key with it.
CREATE TABLE upload_keys (
  user_id     INTEGER NOT NULL,
  key         TEXT NOT NULL,
  test_id     INTEGER NOT NULL REFERENCES drain_tests(id) ON DELETE CASCADE,
  log_sha256  TEXT NOT NULL,
  created_at  TEXT NOT NULL,
  PRIMARY KEY (user_id, key)
);
