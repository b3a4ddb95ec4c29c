-- 008_test_schedule: each site's clock and test interval, each outlet's own interval (issue 19).
-- time_zone: the IANA zone a log's local times (written without an offset) are read in when the
--   uploader names none. Existing sites get 'UTC', which is what every such log was read as before.
-- test_interval_days: how often an outlet of the site is drain-tested by default. 180 days is a
--   common practice for routine checks of drains and outlets, not a standard: each site sets its own.
-- outlets.test_interval_days: the outlet's own interval, NULL = the site's.
ALTER TABLE sites ADD COLUMN time_zone TEXT NOT NULL DEFAULT 'UTC' CHECK (length(time_zone) BETWEEN 1 AND 64);
ALTER TABLE sites ADD COLUMN test_interval_days INTEGER NOT NULL DEFAULT 180 CHECK (test_interval_days BETWEEN 1 AND 3660);
ALTER TABLE outlets ADD COLUMN test_interval_days INTEGER CHECK (test_interval_days IS NULL OR test_interval_days BETWEEN 1 AND 3660);
