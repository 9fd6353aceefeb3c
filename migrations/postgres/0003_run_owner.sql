-- Who drives each run, as in the SQLite schema's migrations/0004_run_owner.sql:
-- process, host, what it is, since when, and its latest heartbeat (epoch
-- milliseconds). NULL: nobody drives the run.
ALTER TABLE runs ADD COLUMN owner_id text;
ALTER TABLE runs ADD COLUMN owner_pid integer;
ALTER TABLE runs ADD COLUMN owner_host text;
ALTER TABLE runs ADD COLUMN owner_label text;
ALTER TABLE runs ADD COLUMN owner_since_ms bigint;
ALTER TABLE runs ADD COLUMN owner_heartbeat_ms bigint;
