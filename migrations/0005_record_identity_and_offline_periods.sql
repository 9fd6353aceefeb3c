-- Stable identities: a random RFC 4122 version 4 UUID per design, build and run,
-- made when the row is inserted and kept by `rolloff store copy`, so a record's
-- digest names the run, not its row number in one database (app/record/DIGEST.md).
-- Rows stored before get one now.
ALTER TABLE designs ADD COLUMN uid TEXT;
ALTER TABLE builds ADD COLUMN uid TEXT;
ALTER TABLE runs ADD COLUMN uid TEXT;
UPDATE designs SET uid = lower(hex(randomblob(4))) || '-' || lower(hex(randomblob(2))) || '-4' || substr(lower(hex(randomblob(2))), 2) || '-'
  || substr('89ab', 1 + (abs(random()) % 4), 1) || substr(lower(hex(randomblob(2))), 2) || '-' || lower(hex(randomblob(6))) WHERE uid IS NULL;
UPDATE builds SET uid = lower(hex(randomblob(4))) || '-' || lower(hex(randomblob(2))) || '-4' || substr(lower(hex(randomblob(2))), 2) || '-'
  || substr('89ab', 1 + (abs(random()) % 4), 1) || substr(lower(hex(randomblob(2))), 2) || '-' || lower(hex(randomblob(6))) WHERE uid IS NULL;
UPDATE runs SET uid = lower(hex(randomblob(4))) || '-' || lower(hex(randomblob(2))) || '-4' || substr(lower(hex(randomblob(2))), 2) || '-'
  || substr('89ab', 1 + (abs(random()) % 4), 1) || substr(lower(hex(randomblob(2))), 2) || '-' || lower(hex(randomblob(6))) WHERE uid IS NULL;
CREATE UNIQUE INDEX designs_by_uid ON designs(uid);
CREATE UNIQUE INDEX builds_by_uid ON builds(uid);
CREATE UNIQUE INDEX runs_by_uid ON runs(uid);

-- When the bench that drove a run could not reach its (server) store and kept
-- the points in its local outbox (app/store/outbox/): from, to as ISO 8601.
CREATE TABLE run_offline_periods (
  run_id  INTEGER NOT NULL REFERENCES runs(id) ON DELETE CASCADE,
  from_at TEXT NOT NULL,
  to_at   TEXT NOT NULL,
  PRIMARY KEY (run_id, from_at)
);
