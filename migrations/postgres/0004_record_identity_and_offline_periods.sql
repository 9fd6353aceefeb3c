-- Stable identities, as in the SQLite schema's
-- migrations/0006_record_identity_and_offline_periods.sql: a random UUID per
-- design, build and run, made at insert and kept by `rolloff store copy`.
-- A volatile default fills every existing row with its own value.
ALTER TABLE designs ADD COLUMN uid uuid NOT NULL DEFAULT gen_random_uuid();
ALTER TABLE builds ADD COLUMN uid uuid NOT NULL DEFAULT gen_random_uuid();
ALTER TABLE runs ADD COLUMN uid uuid NOT NULL DEFAULT gen_random_uuid();
CREATE UNIQUE INDEX designs_by_uid ON designs(uid);
CREATE UNIQUE INDEX builds_by_uid ON builds(uid);
CREATE UNIQUE INDEX runs_by_uid ON runs(uid);

-- When the bench that drove a run could not reach this server and kept the
-- points in its local outbox (app/store/outbox/).
CREATE TABLE run_offline_periods (
  run_id  bigint NOT NULL REFERENCES runs(id) ON DELETE CASCADE,
  from_at timestamptz NOT NULL,
  to_at   timestamptz NOT NULL,
  PRIMARY KEY (run_id, from_at)
);
