-- Who drives each run (process, host, what it is), since when, and its latest
-- heartbeat (epoch milliseconds, compared as numbers by the take-over's
-- conditional update). NULL: nobody drives the run.
ALTER TABLE runs ADD COLUMN owner_id TEXT;
ALTER TABLE runs ADD COLUMN owner_pid INTEGER;
ALTER TABLE runs ADD COLUMN owner_host TEXT;
ALTER TABLE runs ADD COLUMN owner_label TEXT;
ALTER TABLE runs ADD COLUMN owner_since_ms INTEGER;
ALTER TABLE runs ADD COLUMN owner_heartbeat_ms INTEGER;
