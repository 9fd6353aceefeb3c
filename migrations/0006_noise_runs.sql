-- rolloff-migration: foreign-keys-off
-- Noise runs: a third kind of run, and its records. SQLite cannot change a
-- CHECK constraint in place, so runs is rebuilt with 'noise' among its kinds
-- by SQLite's own procedure for other schema changes (sqlite.org,
-- "ALTER TABLE", section "Making Other Kinds Of Table Schema Changes"):
-- foreign keys off around the transaction (the directive above tells the
-- migration runner), new table, copy, drop, rename, indexes again, then
-- PRAGMA foreign_key_check before the commit. Rows, ids, stable ids and owners are kept.
CREATE TABLE new_runs (
  id               INTEGER PRIMARY KEY,
  build_id         INTEGER NOT NULL REFERENCES builds(id),
  kind             TEXT NOT NULL CHECK (kind IN ('ac', 'dc', 'noise')),
  status           TEXT NOT NULL DEFAULT 'planned'
                   CHECK (status IN ('planned', 'running', 'paused', 'done', 'stopped', 'failed')),
  planned_count    INTEGER NOT NULL DEFAULT 0,
  -- points and noise records alike, kept by the store in the same transaction as each
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
  verdict_json     TEXT,
  bench_name       TEXT NOT NULL DEFAULT '',
  owner_id         TEXT,
  owner_pid        INTEGER,
  owner_host       TEXT,
  owner_label      TEXT,
  owner_since_ms   INTEGER,
  owner_heartbeat_ms INTEGER,
  uid              TEXT
);
INSERT INTO new_runs (id, build_id, kind, status, planned_count, point_count, simulated, created_at, started_at, ended_at,
  software_version, operator, notes, schedule_id, request_json, bench_json, figures_json, verdict_json, bench_name,
  owner_id, owner_pid, owner_host, owner_label, owner_since_ms, owner_heartbeat_ms, uid)
SELECT id, build_id, kind, status, planned_count, point_count, simulated, created_at, started_at, ended_at,
  software_version, operator, notes, schedule_id, request_json, bench_json, figures_json, verdict_json, bench_name,
  owner_id, owner_pid, owner_host, owner_label, owner_since_ms, owner_heartbeat_ms, uid
FROM runs;
DROP TABLE runs;
ALTER TABLE new_runs RENAME TO runs;
CREATE INDEX runs_by_build ON runs(build_id, id);
CREATE INDEX runs_by_status ON runs(status, id);
CREATE INDEX runs_by_bench ON runs(bench_name, id);
CREATE UNIQUE INDEX runs_by_uid ON runs(uid);

-- One record of a noise run per step, like points: UNIQUE (run_id, step) makes a
-- resumed run idempotent. A scope record keeps its own Welch estimate (the
-- one-sided PSD, V²/Hz, on the bins k·fs/N, k = 0 … N/2, as little-endian
-- doubles) so the run's density is the records' combination; a meter reading
-- keeps its AC RMS. An ordinary rowid table: a PSD of thousands of bins is far
-- larger than a WITHOUT ROWID row should be.
CREATE TABLE noise_records (
  run_id             INTEGER NOT NULL REFERENCES runs(id) ON DELETE CASCADE,
  step               INTEGER NOT NULL CHECK (step >= 0),
  sample_rate_hz     REAL,
  segments           INTEGER NOT NULL DEFAULT 0 CHECK (segments >= 0),
  degrees_of_freedom REAL NOT NULL DEFAULT 0 CHECK (degrees_of_freedom >= 0),
  rms_v              REAL,
  mean_v             REAL,
  flags              INTEGER NOT NULL DEFAULT 0,
  measured_at_ms     INTEGER NOT NULL,
  psd_v2_per_hz      BLOB,
  PRIMARY KEY (run_id, step)
);
