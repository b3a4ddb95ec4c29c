-- 003_records (PostgreSQL 15): the same as migrations/003_records.sql in PostgreSQL's terms.
-- 1. One test date. drain_tests.tested_at is THE date of a test (UTC, ISO 8601): the date the
--    person stated, else the time of the first reading of the first fit's window on the log's own
--    clock; tested_at_source says which. Existing tests without a usable date get it from their
--    stored log (the first fit's window.startTime) where it has one; the others are listed in
--    undated_tests, which `efflux serve` and `efflux audit verify` report.
-- 2. Sites carry the self-review setting (four eyes, unless an admin allows self-review).
-- 3. People: optional site limits (user_sites), sessions know the token they were opened with
--    (revoking the token ends them), idempotency keys of uploads.
-- The backfills below only find rows in a database made at schema 2; they say what SQLite's
-- date functions would have said (efflux_sqlite_time_valid, efflux_sqlite_time below).

-- SQLite's date parser (strftime('%s', t) IS NOT NULL), for the texts it reads: [-]YYYY-MM-DD,
-- then any run of spaces or T, then optionally HH:MM[:SS[.fff]] (also alone, without a date),
-- then optionally Z or ±HH:MM (after a time only), spaces around it; 'now' in any case; a Julian
-- day number (spaces allowed). Fields in SQLite's ranges: month 1–12, day 1–31, hour 0–24,
-- minute 0–59, second 0–59, zone hour 0–14. Checked against SQLite itself in
-- test/store/postgres-migrations.test.ts.
-- Parts: 1 year, 2 month, 3 day, 4 hour, 5 minute, 6 second, 7 fraction, 8 Z, 9 zone sign,
-- 10 zone hour, 11 zone minute.
CREATE FUNCTION efflux_sqlite_time_parts(t TEXT) RETURNS TEXT[]
LANGUAGE sql IMMUTABLE STRICT AS $$
  SELECT regexp_match(t,
    '^(?:(-?\d{4})-(\d{2})-(\d{2})[T\s]*)?(?:(\d{2}):(\d{2})(?::(\d{2})(\.\d+)?)?\s*(?:([Zz])|([+-])(\d{2}):(\d{2}))?\s*)?$')
$$;

CREATE FUNCTION efflux_sqlite_time_valid(t TEXT) RETURNS BOOLEAN
LANGUAGE plpgsql IMMUTABLE STRICT AS $$
DECLARE
  p TEXT[] := efflux_sqlite_time_parts(t);
BEGIN
  IF lower(t) = 'now' THEN RETURN TRUE; END IF;
  IF t ~ '^\s*[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?\s*$' THEN
    RETURN trim(t)::double precision >= 0 AND trim(t)::double precision < 5373484.5;
  END IF;
  IF p IS NULL OR (p[1] IS NULL AND p[4] IS NULL) THEN RETURN FALSE; END IF;
  RETURN (p[1] IS NULL OR (p[2]::int BETWEEN 1 AND 12 AND p[3]::int BETWEEN 1 AND 31))
    AND (p[4] IS NULL OR (p[4]::int <= 24 AND p[5]::int <= 59 AND COALESCE(p[6], '0')::int <= 59))
    AND (p[9] IS NULL OR (p[10]::int <= 14 AND p[11]::int <= 59));
END $$;

-- A date and time as SQLite reads it, in UTC (no zone: UTC; days past a month's end roll over,
-- as SQLite's arithmetic does); NULL when SQLite would not read it or it has no date (or a year
-- before 1, which SQLite reads and PostgreSQL's calendar does not start at).
CREATE FUNCTION efflux_sqlite_time(t TEXT) RETURNS TIMESTAMP
LANGUAGE plpgsql IMMUTABLE STRICT AS $$
DECLARE
  p TEXT[] := efflux_sqlite_time_parts(t);
  at TIMESTAMP;
BEGIN
  IF p IS NULL OR p[1] IS NULL OR p[1]::int < 1 OR NOT efflux_sqlite_time_valid(t) THEN RETURN NULL; END IF;
  at := make_timestamp(p[1]::int, p[2]::int, 1, 0, 0, 0)
    + make_interval(days => p[3]::int - 1, hours => COALESCE(p[4], '0')::int, mins => COALESCE(p[5], '0')::int,
                    secs => round((COALESCE(p[6], '0') || COALESCE(p[7], ''))::numeric, 3)::double precision);
  IF p[9] IS NOT NULL THEN
    at := at - (CASE p[9] WHEN '-' THEN -1 ELSE 1 END) * make_interval(hours => p[10]::int, mins => p[11]::int);
  END IF;
  RETURN at;
END $$;

-- The trigger of 001 forbids every change to a test but pending → analysed; it is replaced below.
DROP TRIGGER drain_tests_immutable ON drain_tests;

ALTER TABLE drain_tests ADD COLUMN tested_at_source TEXT CHECK (tested_at_source IS NULL OR tested_at_source IN ('stated', 'log'));

-- Stated dates SQLite can read are kept verbatim (reports already issued quote them and must verify).
UPDATE drain_tests SET tested_at_source = 'stated'
WHERE tested_at IS NOT NULL AND efflux_sqlite_time_valid(tested_at);

-- What could not be dated, with the reason (the original text stays in the test.upload audit entry).
CREATE TABLE undated_tests (
  test_id  BIGINT PRIMARY KEY REFERENCES drain_tests(id),
  reason   TEXT NOT NULL
);

-- The rest from their stored log: the first fit's window start, on the log's own clock, in UTC.
UPDATE drain_tests SET
  tested_at = (SELECT f.result::jsonb #>> '{window,startTime}' FROM fits f WHERE f.test_id = drain_tests.id ORDER BY f.id LIMIT 1),
  tested_at_source = 'log'
WHERE tested_at_source IS NULL
  AND (SELECT f.result::jsonb #>> '{window,startTime}' FROM fits f WHERE f.test_id = drain_tests.id ORDER BY f.id LIMIT 1) IS NOT NULL;

-- Logs in elapsed time whose preamble states when logging started ("Started: 2024-10-07T08:00:00Z"):
-- that start plus the first fit's window offset (server/core/analysis/test-date.ts, logTestDate).
-- SQLite's printf('%+.3f seconds') takes a missing offset as 0; strftime's %f is SS.SSS.
UPDATE drain_tests SET
  tested_at = (SELECT to_char(efflux_sqlite_time(m.value ->> 'value')
                 + make_interval(secs => round(COALESCE((SELECT (f.result::jsonb #>> '{window,startS}')::double precision FROM fits f WHERE f.test_id = drain_tests.id ORDER BY f.id LIMIT 1), 0)::numeric, 3)::double precision),
                 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')
               FROM jsonb_array_elements(CASE WHEN jsonb_typeof(drain_tests.detected::jsonb -> 'metadata') = 'array'
                                              THEN drain_tests.detected::jsonb -> 'metadata' ELSE '[]'::jsonb END) m
               WHERE lower(trim(m.value ->> 'key')) IN ('start', 'started', 'start time', 'started at', 'start date', 'test start', 'test started', 'logging started', 'log start')
                 AND trim(m.value ->> 'value') ~ '^[0-9]{4}-[0-9]{2}-[0-9]{2}[T ][0-9]{2}:[0-9]{2}.*[Z+-]'
               LIMIT 1),
  tested_at_source = 'log'
WHERE tested_at_source IS NULL AND detected IS NOT NULL AND efflux_json_valid(detected)
  AND (SELECT 1 FROM jsonb_array_elements(CASE WHEN jsonb_typeof(drain_tests.detected::jsonb -> 'metadata') = 'array'
                                               THEN drain_tests.detected::jsonb -> 'metadata' ELSE '[]'::jsonb END) m
       WHERE lower(trim(m.value ->> 'key')) IN ('start', 'started', 'start time', 'started at', 'start date', 'test start', 'test started', 'logging started', 'log start')
         AND trim(m.value ->> 'value') ~ '^[0-9]{4}-[0-9]{2}-[0-9]{2}[T ][0-9]{2}:[0-9]{2}.*[Z+-]'
       LIMIT 1) IS NOT NULL
  AND EXISTS (SELECT 1 FROM fits f WHERE f.test_id = drain_tests.id);

INSERT INTO undated_tests (test_id, reason)
SELECT id, CASE WHEN tested_at IS NULL THEN 'no date was stated and its log has only elapsed time'
                ELSE 'the stated date "' || tested_at || '" is not a date, and its log has only elapsed time' END
FROM drain_tests WHERE tested_at_source IS NULL AND status = 'analysed';
UPDATE drain_tests SET tested_at = NULL WHERE tested_at_source IS NULL AND status = 'analysed';

-- A test's identity and bytes never change; only pending → analysed, when an undated test also
-- receives its date from the log (once).
CREATE TRIGGER drain_tests_immutable BEFORE UPDATE ON drain_tests
FOR EACH ROW WHEN (NOT (OLD.status = 'pending' AND NEW.status = 'analysed')
  OR NEW.id IS DISTINCT FROM OLD.id OR NEW.vessel_id IS DISTINCT FROM OLD.vessel_id OR NEW.outlet_id IS DISTINCT FROM OLD.outlet_id
  OR NEW.log_sha256 IS DISTINCT FROM OLD.log_sha256 OR NEW.log_name IS DISTINCT FROM OLD.log_name
  OR NEW.baro_sha256 IS DISTINCT FROM OLD.baro_sha256 OR NEW.baro_name IS DISTINCT FROM OLD.baro_name
  OR NEW.settings IS DISTINCT FROM OLD.settings OR NEW.operator IS DISTINCT FROM OLD.operator
  OR NEW.logger_id IS DISTINCT FROM OLD.logger_id
  OR (NEW.tested_at IS DISTINCT FROM OLD.tested_at AND OLD.tested_at IS NOT NULL)
  OR (NEW.tested_at_source IS DISTINCT FROM OLD.tested_at_source AND OLD.tested_at_source IS NOT NULL)
  OR NEW.notes IS DISTINCT FROM OLD.notes OR NEW.created_by IS DISTINCT FROM OLD.created_by
  OR NEW.created_at IS DISTINCT FROM OLD.created_at)
EXECUTE FUNCTION efflux_refuse('drain tests are immutable once analysed');

-- Duplicates: the same bytes for the same vessel are found by this index.
CREATE INDEX drain_tests_log ON drain_tests (vessel_id, log_sha256);

-- Four eyes: 1 lets the person who uploaded a test or asked for a refit approve it (marked).
ALTER TABLE sites ADD COLUMN self_review_allowed INTEGER NOT NULL DEFAULT 0 CHECK (self_review_allowed IN (0, 1));

-- A person limited to sites acts on those sites' vessels only; no row = every site.
CREATE TABLE user_sites (
  user_id  BIGINT NOT NULL REFERENCES users(id),
  site_id  BIGINT NOT NULL REFERENCES sites(id),
  PRIMARY KEY (user_id, site_id)
);

-- The token a session was opened with: revoking the token ends its sessions.
ALTER TABLE sessions ADD COLUMN token_id BIGINT REFERENCES api_tokens(id);

-- Idempotency-Key of uploads, per person: a retry answers the first result. A refused upload is
-- withdrawn (its test deleted), and its key with it.
CREATE TABLE upload_keys (
  user_id     BIGINT NOT NULL,
  key         TEXT NOT NULL,
  test_id     BIGINT NOT NULL REFERENCES drain_tests(id) ON DELETE CASCADE,
  log_sha256  TEXT NOT NULL,
  created_at  TEXT NOT NULL,
  PRIMARY KEY (user_id, key)
);

-- A person's site limits are part of the cached credentials (write_counter, 001).
CREATE TRIGGER user_sites_count_write AFTER INSERT OR UPDATE OR DELETE OR TRUNCATE ON user_sites
FOR EACH STATEMENT EXECUTE FUNCTION efflux_count_write();
