-- Rolloff schema 1. Released migrations are never edited: add a new numbered
-- file instead. Timestamps are ISO 8601 UTC text; JSON columns hold the
-- contract types (app/service/contract.ts) as text.

CREATE TABLE designs (
  id          INTEGER PRIMARY KEY,
  name        TEXT NOT NULL,
  design_json TEXT NOT NULL,
  created_at  TEXT NOT NULL
);

CREATE TABLE builds (
  id                 INTEGER PRIMARY KEY,
  design_id          INTEGER NOT NULL REFERENCES designs(id),
  label              TEXT NOT NULL,
  notes              TEXT NOT NULL DEFAULT '',
  actual_values_json TEXT NOT NULL DEFAULT '{}',
  created_at         TEXT NOT NULL
);
CREATE INDEX builds_by_design ON builds(design_id);

-- Every instrument identity seen at an address, for the record's bench table.
CREATE TABLE instruments (
  id            INTEGER PRIMARY KEY,
  role          TEXT NOT NULL,
  identity_text TEXT NOT NULL,
  identity_json TEXT NOT NULL,
  address       TEXT NOT NULL,
  first_seen_at TEXT NOT NULL,
  last_seen_at  TEXT NOT NULL,
  UNIQUE (identity_text, address)
);

CREATE TABLE schedules (
  id            INTEGER PRIMARY KEY,
  build_id      INTEGER NOT NULL REFERENCES builds(id),
  request_json  TEXT NOT NULL,
  every_minutes REAL NOT NULL CHECK (every_minutes > 0),
  run_count     INTEGER CHECK (run_count IS NULL OR run_count > 0),
  until_at      TEXT,
  created_at    TEXT NOT NULL,
  CHECK (run_count IS NOT NULL OR until_at IS NOT NULL)
);

-- Small, filtered columns first and JSON last: SQLite reads a row's columns in
-- order, so listing stops before the JSON. The plan (up to thousands of steps)
-- lives in run_plans so that updating a run's status or point count never
-- rewrites it.
CREATE TABLE runs (
  id               INTEGER PRIMARY KEY,
  build_id         INTEGER NOT NULL REFERENCES builds(id),
  kind             TEXT NOT NULL CHECK (kind IN ('ac', 'dc')),
  status           TEXT NOT NULL DEFAULT 'planned'
                   CHECK (status IN ('planned', 'running', 'paused', 'done', 'stopped', 'failed')),
  planned_count    INTEGER NOT NULL DEFAULT 0,
  -- kept by the store in the same transaction as each point, so listing runs never counts points
  point_count      INTEGER NOT NULL DEFAULT 0,
  simulated        INTEGER NOT NULL DEFAULT 0 CHECK (simulated IN (0, 1)),
  created_at       TEXT NOT NULL,
  started_at       TEXT,
  ended_at         TEXT,
  software_version TEXT NOT NULL,
  operator         TEXT NOT NULL DEFAULT '',
  notes            TEXT NOT NULL DEFAULT '',
  schedule_id      INTEGER REFERENCES schedules(id),
  request_json     TEXT NOT NULL,
  bench_json       TEXT NOT NULL DEFAULT '[]',
  figures_json     TEXT,
  verdict_json     TEXT
);
CREATE INDEX runs_by_build ON runs(build_id, id);
CREATE INDEX runs_by_status ON runs(status, id);

CREATE TABLE run_plans (
  run_id    INTEGER PRIMARY KEY REFERENCES runs(id) ON DELETE CASCADE,
  plan_json TEXT NOT NULL
);

-- One measured step. UNIQUE (run_id, step) makes a resumed sweep idempotent and
-- is also the index that loads a run's points in step order.
CREATE TABLE points (
  run_id          INTEGER NOT NULL REFERENCES runs(id) ON DELETE CASCADE,
  step            INTEGER NOT NULL CHECK (step >= 0),
  stimulus        REAL NOT NULL,
  amplitude_vpp   REAL NOT NULL,
  input_reading   REAL,
  output_reading  REAL,
  gain_db         REAL,
  gain_u_db       REAL,
  phase_deg       REAL,
  phase_u_deg     REAL,
  output_v        REAL,
  flags           INTEGER NOT NULL DEFAULT 0,
  -- milliseconds since 1970-01-01T00:00:00Z: a quarter of the bytes of ISO text in the largest table
  measured_at_ms  INTEGER NOT NULL,
  PRIMARY KEY (run_id, step)
) WITHOUT ROWID;

CREATE TABLE run_events (
  id      INTEGER PRIMARY KEY,
  run_id  INTEGER NOT NULL REFERENCES runs(id) ON DELETE CASCADE,
  at      TEXT NOT NULL,
  level   TEXT NOT NULL CHECK (level IN ('info', 'warning', 'error')),
  message TEXT NOT NULL
);
CREATE INDEX run_events_by_run ON run_events(run_id, id);

-- A through-calibration (generator straight into both channels) of one bench
-- over a frequency grid; corrections are subtracted from later measurements.
CREATE TABLE calibrations (
  id                    INTEGER PRIMARY KEY,
  bench_key             TEXT NOT NULL,
  bench_json            TEXT NOT NULL,
  frequencies_hz_json   TEXT NOT NULL,
  gain_db_json          TEXT NOT NULL,
  phase_deg_json        TEXT NOT NULL,
  notes                 TEXT NOT NULL DEFAULT '',
  created_at            TEXT NOT NULL
);
CREATE INDEX calibrations_by_bench ON calibrations(bench_key, id);
