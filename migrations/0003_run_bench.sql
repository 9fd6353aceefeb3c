-- The bench (its name: --bench, ROLLOFF_BENCH or the host name) that drove each
-- run, so a lab's history can be told apart and filtered by bench. Runs stored
-- before this keep '' (bench not recorded).
ALTER TABLE runs ADD COLUMN bench_name TEXT NOT NULL DEFAULT '';
CREATE INDEX runs_by_bench ON runs(bench_name, id);
