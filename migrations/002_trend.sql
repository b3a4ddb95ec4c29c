-- 002_trend: what following an outlet's coefficient over months needs (server/store/trends.ts).
-- 1. Each fit's standard uncertainties beside its values, so a trend reads numbers, not results.
-- 2. A cache of each outlet's trend status, marked stale by triggers whenever its inputs change
--    (an approval, a refit of an approved fit, a maintenance event, a new threshold), so the fleet
--    view reads one small row per outlet instead of every fit; whoever changed the data (API, demo
--    loader, a script) cannot leave the cache stale.
-- 3. Status changes: an append-only record of every change of status an approval caused.

ALTER TABLE fits ADD COLUMN cda_u REAL;
ALTER TABLE fits ADD COLUMN cd_u REAL;
UPDATE fits SET
  cda_u = json_extract(result, '$.effectiveAreaM2.standardUncertainty'),
  cd_u = json_extract(result, '$.dischargeCoefficient.standardUncertainty');

-- The same rule as 001 with the two new columns: what was computed never changes.
DROP TRIGGER fits_immutable;
CREATE TRIGGER fits_immutable BEFORE UPDATE ON fits
WHEN NEW.id IS NOT OLD.id OR NEW.test_id IS NOT OLD.test_id OR NEW.vessel_id IS NOT OLD.vessel_id
  OR NEW.outlet_id IS NOT OLD.outlet_id OR NEW.settings IS NOT OLD.settings
  OR NEW.vessel_spec IS NOT OLD.vessel_spec OR NEW.result IS NOT OLD.result OR NEW.engine_version IS NOT OLD.engine_version
  OR NEW.cda_m2 IS NOT OLD.cda_m2 OR NEW.cd IS NOT OLD.cd OR NEW.cda_u IS NOT OLD.cda_u OR NEW.cd_u IS NOT OLD.cd_u
  OR NEW.created_by IS NOT OLD.created_by OR NEW.created_at IS NOT OLD.created_at
  OR (NEW.status IS NOT OLD.status AND OLD.status <> 'draft')
  OR (NEW.status IS OLD.status AND (NEW.review_comment IS NOT OLD.review_comment
      OR NEW.reviewed_by IS NOT OLD.reviewed_by OR NEW.reviewed_at IS NOT OLD.reviewed_at))
  OR (NEW.superseded_by IS NOT OLD.superseded_by AND OLD.superseded_by IS NOT NULL)
BEGIN SELECT RAISE(ABORT, 'fits are never overwritten'); END;

-- An outlet's history: its approved fits.
CREATE INDEX fits_outlet_status ON fits (outlet_id, status);

-- One row per outlet whose status was computed; `body` is the status object (JSON).
-- valid_until_ms: when time alone would change the status (a forecast date passing).
CREATE TABLE outlet_trend_status (
  outlet_id          INTEGER PRIMARY KEY REFERENCES outlets(id),
  status             TEXT NOT NULL,
  days_to_threshold  REAL,
  computed_at_ms     INTEGER NOT NULL,
  valid_until_ms     REAL NOT NULL,
  body               TEXT NOT NULL CHECK (json_valid(body))
);

-- Outlets whose cached status is stale.
CREATE TABLE outlet_trend_stale (outlet_id INTEGER PRIMARY KEY REFERENCES outlets(id));
INSERT INTO outlet_trend_stale (outlet_id) SELECT id FROM outlets;

CREATE TRIGGER trend_stale_outlet_new AFTER INSERT ON outlets
BEGIN INSERT OR IGNORE INTO outlet_trend_stale (outlet_id) VALUES (NEW.id); END;
CREATE TRIGGER trend_stale_outlet_changed AFTER UPDATE OF action_threshold, retired_at ON outlets
BEGIN INSERT OR IGNORE INTO outlet_trend_stale (outlet_id) VALUES (NEW.id); END;
CREATE TRIGGER trend_stale_fit_new AFTER INSERT ON fits
WHEN NEW.outlet_id IS NOT NULL AND NEW.status = 'approved'
BEGIN INSERT OR IGNORE INTO outlet_trend_stale (outlet_id) VALUES (NEW.outlet_id); END;
CREATE TRIGGER trend_stale_fit_reviewed AFTER UPDATE OF status, superseded_by ON fits
WHEN NEW.outlet_id IS NOT NULL
BEGIN INSERT OR IGNORE INTO outlet_trend_stale (outlet_id) VALUES (NEW.outlet_id); END;
-- An event without an outlet applies to every outlet of the vessel.
CREATE TRIGGER trend_stale_event AFTER INSERT ON maintenance_events
BEGIN
  INSERT OR IGNORE INTO outlet_trend_stale (outlet_id)
    SELECT id FROM outlets WHERE vessel_id = NEW.vessel_id AND (NEW.outlet_id IS NULL OR id = NEW.outlet_id);
END;

CREATE TABLE outlet_status_changes (
  id                 INTEGER PRIMARY KEY,
  outlet_id          INTEGER NOT NULL REFERENCES outlets(id),
  -- the approval that caused it
  fit_id             INTEGER REFERENCES fits(id),
  from_status        TEXT,
  to_status          TEXT NOT NULL,
  reason             TEXT NOT NULL,
  days_to_threshold  REAL,
  at                 TEXT NOT NULL
);
CREATE INDEX outlet_status_changes_outlet ON outlet_status_changes (outlet_id, id);
CREATE TRIGGER outlet_status_changes_no_update BEFORE UPDATE ON outlet_status_changes
BEGIN SELECT RAISE(ABORT, 'status changes are append-only'); END;
CREATE TRIGGER outlet_status_changes_no_delete BEFORE DELETE ON outlet_status_changes
BEGIN SELECT RAISE(ABORT, 'status changes are append-only'); END;
