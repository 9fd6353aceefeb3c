-- The bench (its name: --bench, ROLLOFF_BENCH or the host name) that drove each
-- run, as in the SQLite schema's migrations/0003_run_bench.sql. Runs stored
-- before this keep '' (bench not recorded).
ALTER TABLE runs ADD COLUMN bench_name text NOT NULL DEFAULT '';
CREATE INDEX runs_by_bench ON runs(bench_name, id);
