-- Noise runs: a third kind of run, and its records (see migrations/0006_noise_runs.sql).
ALTER TABLE runs DROP CONSTRAINT runs_kind_check;
ALTER TABLE runs ADD CONSTRAINT runs_kind_check CHECK (kind IN ('ac', 'dc', 'noise'));

-- One record of a noise run per step: a scope record's own Welch estimate (the
-- one-sided PSD, V²/Hz, on the bins k·fs/N, k = 0 … N/2, as little-endian
-- doubles), or a meter reading's AC RMS. point_count of the run counts them.
CREATE TABLE noise_records (
  run_id             bigint NOT NULL REFERENCES runs(id) ON DELETE CASCADE,
  step               integer NOT NULL CHECK (step >= 0),
  sample_rate_hz     double precision,
  segments           integer NOT NULL DEFAULT 0 CHECK (segments >= 0),
  degrees_of_freedom double precision NOT NULL DEFAULT 0 CHECK (degrees_of_freedom >= 0),
  rms_v              double precision,
  mean_v             double precision,
  flags              integer NOT NULL DEFAULT 0,
  measured_at        timestamptz NOT NULL,
  psd_v2_per_hz      bytea,
  PRIMARY KEY (run_id, step)
);
