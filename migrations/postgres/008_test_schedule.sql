-- 008_test_schedule: each site's clock and test interval, each outlet's own interval (issue 19).
-- The same as migrations/008_test_schedule.sql (see there for the defaults and why).
ALTER TABLE sites ADD COLUMN time_zone TEXT NOT NULL DEFAULT 'UTC' CHECK (length(time_zone) BETWEEN 1 AND 64);
ALTER TABLE sites ADD COLUMN test_interval_days INTEGER NOT NULL DEFAULT 180 CHECK (test_interval_days BETWEEN 1 AND 3660);
ALTER TABLE outlets ADD COLUMN test_interval_days INTEGER CHECK (test_interval_days IS NULL OR test_interval_days BETWEEN 1 AND 3660);
