-- Settings that belong to one bench (one set of instruments), keyed like
-- calibrations by the bench key. NULL means "not set on this bench".
CREATE TABLE bench_settings (
  bench_key        TEXT PRIMARY KEY,
  max_stimulus_vpp REAL CHECK (max_stimulus_vpp IS NULL OR max_stimulus_vpp > 0),
  updated_at       TEXT NOT NULL
);
