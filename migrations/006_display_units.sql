-- A person's display preference: the units the workbench, their text and their PDFs are written in
-- (si: mm², L/s, m; us: in², US gal/min, ft). Stored values and JSON stay SI whatever is chosen.
-- No row: the default, SI.
CREATE TABLE user_preferences (
  user_id        INTEGER PRIMARY KEY REFERENCES users(id),
  display_units  TEXT NOT NULL DEFAULT 'si' CHECK (display_units IN ('si', 'us')),
  updated_at     TEXT NOT NULL
);
