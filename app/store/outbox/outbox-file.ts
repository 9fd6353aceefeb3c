/**
 * The outbox: a small SQLite file on the bench's own disk holding, in the
 * order they were made, the writes to a server store that could not be sent
 * when they were made (points, a noise run's records, events, status changes,
 * results, the release of a run), and since when each run's bench has been cut off. Each entry is
 * committed with synchronous=FULL before the sweep goes on, so a point kept
 * here is as safe as one on the server; an entry is deleted only after the
 * server has taken it.
 *
 * Several processes of one bench may share the file (WAL). Each entry names
 * the process that wrote it; a process sends only its own entries, and adopts
 * those of a process that is gone (same machine, so its pid says so).
 */
import { mkdirSync } from 'node:fs';
import { dirname } from 'node:path';
import Database from 'better-sqlite3';
import type { RunFigures, RunStatus, Verdict } from '../../contract/contract';
import { StoreDamagedError, StoreUnavailableError } from '../errors';
import type { NewNoiseRecord, NewPoint } from '../types';

/** How long a busy first open is tried again (OutboxFile.open). */
const OPEN_RETRY_MS = 10_000;

/** A first open that found the file locked: tried again, and refused only if it stays locked. */
class OutboxBusyError extends Error {}

/** Waits without giving up the thread (the open is synchronous, as better-sqlite3 is). */
function sleepMs(ms: number): void {
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, ms);
}

/** A noise record as kept: its spectrum as plain numbers (JSON keeps a double exactly), its time fixed when it was made. */
export type KeptNoiseRecord = Omit<NewNoiseRecord, 'psdV2PerHz' | 'measuredAt'> & { measuredAt: string; psdV2PerHz?: number[] };

/** A write waiting for the server, as the store interface would have made it. */
export type OutboxWrite =
  | { kind: 'point'; point: NewPoint & { measuredAt: string } }
  | { kind: 'noiseRecord'; record: KeptNoiseRecord }
  /** asOwner (events and status): the owner it was written as (OwnerCondition); sent only while that owner still owns the run. */
  | { kind: 'event'; level: 'info' | 'warning' | 'error'; message: string; at: string; asOwner?: string }
  | { kind: 'status'; status: RunStatus; at: string; asOwner?: string }
  | { kind: 'results'; figures: RunFigures; verdict: Verdict | null }
  | { kind: 'release'; ownerId: string };

export interface OutboxEntry {
  seq: number;
  runId: number;
  ownerId: string;
  write: OutboxWrite;
}

/** The process that writes entries: an owner id as in run ownership, and its pid on this machine. */
export interface OutboxWriter {
  ownerId: string;
  pid: number;
}

/** Bumped when the file's layout changes; a file of another version is refused (its entries are not guessed at). */
const OUTBOX_FORMAT = 1;

const SCHEMA = `
CREATE TABLE IF NOT EXISTS pending (
  seq      INTEGER PRIMARY KEY AUTOINCREMENT,
  run_id   INTEGER NOT NULL,
  owner_id TEXT NOT NULL,
  pid      INTEGER NOT NULL,
  write    TEXT NOT NULL
);
CREATE INDEX IF NOT EXISTS pending_by_run ON pending(run_id, seq);
-- Runs whose bench has been cut off from the server since this instant (one row while it lasts).
CREATE TABLE IF NOT EXISTS offline_runs (
  run_id   INTEGER PRIMARY KEY,
  since    TEXT NOT NULL,
  owner_id TEXT NOT NULL,
  pid      INTEGER NOT NULL
);`;

/** NaN is not JSON: kept as null in the file and read back as NaN (the store's "missing"). */
function writeToJson(write: OutboxWrite): string {
  return JSON.stringify(write, (_key, value) => (typeof value === 'number' && !Number.isFinite(value) ? null : value));
}

function writeFromJson(text: string): OutboxWrite {
  const write = JSON.parse(text) as OutboxWrite;
  if (write.kind === 'point') {
    const point = write.point as unknown as Record<string, unknown>;
    for (const name of ['inputReading', 'outputReading', 'gainDb', 'gainUncertaintyDb', 'phaseDeg', 'phaseUncertaintyDeg', 'outputV']) {
      if (point[name] === null) point[name] = Number.NaN;
    }
  }
  if (write.kind === 'noiseRecord') {
    const record = write.record as unknown as Record<string, unknown>;
    for (const name of ['sampleRateHz', 'rmsV', 'meanV']) {
      if (record[name] === null) record[name] = Number.NaN;
    }
  }
  return write;
}

export class OutboxFile {
  private readonly db: Database.Database;
  private readonly statements;

  private constructor(readonly path: string, db: Database.Database) {
    this.db = db;
    this.statements = {
      append: db.prepare('INSERT INTO pending (run_id, owner_id, pid, write) VALUES (?, ?, ?, ?)'),
      entriesOf: db.prepare('SELECT seq, run_id, owner_id, write FROM pending WHERE owner_id = ? ORDER BY seq'),
      remove: db.prepare('DELETE FROM pending WHERE seq = ?'),
      countOfRun: db.prepare('SELECT count(*) AS n FROM pending WHERE run_id = ?'),
      countOf: db.prepare('SELECT count(*) AS n FROM pending WHERE owner_id = ?'),
      ownersOfRun: db.prepare('SELECT DISTINCT owner_id, pid FROM pending WHERE run_id = ? UNION SELECT owner_id, pid FROM offline_runs WHERE run_id = ?'),
      owners: db.prepare('SELECT DISTINCT owner_id, pid FROM pending UNION SELECT owner_id, pid FROM offline_runs'),
      adoptPending: db.prepare('UPDATE pending SET owner_id = @to, pid = @pid WHERE owner_id = @from'),
      adoptOffline: db.prepare('UPDATE offline_runs SET owner_id = @to, pid = @pid WHERE owner_id = @from'),
      markOffline: db.prepare('INSERT INTO offline_runs (run_id, since, owner_id, pid) VALUES (?, ?, ?, ?) ON CONFLICT (run_id) DO NOTHING'),
      offlineOf: db.prepare('SELECT run_id, since FROM offline_runs WHERE owner_id = ? ORDER BY run_id'),
      offlineSince: db.prepare('SELECT since FROM offline_runs WHERE run_id = ?'),
      endOffline: db.prepare('DELETE FROM offline_runs WHERE run_id = ?'),
    };
  }

  /**
   * Opens (creating) the outbox at path; a file that is not an outbox of this format is refused untouched.
   * Several bench processes may open the same fresh file at one moment. SQLite's busy timeout covers most of
   * the waiting, but not every step of a first open (turning a new file to WAL among other openers can answer
   * "database is locked" at once; seen about once in a few hundred opens on a loaded two-core machine), so a
   * busy open is tried again, from the start, for up to OPEN_RETRY_MS. The open is safe to repeat: it looks
   * and creates under the write lock, in one transaction.
   */
  static open(path: string): OutboxFile {
    const giveUpAtMs = Date.now() + OPEN_RETRY_MS;
    for (let attempt = 1; ; attempt++) {
      try {
        return OutboxFile.openOnce(path);
      } catch (error) {
        if (!(error instanceof OutboxBusyError)) throw error;
        if (Date.now() >= giveUpAtMs) {
          throw new StoreUnavailableError(path, `the outbox stayed locked by another process for ${OPEN_RETRY_MS / 1000} s`, 'Another Rolloff process of this bench is using it; close it, or set ROLLOFF_OUTBOX_DIR to another folder.');
        }
        sleepMs(Math.min(10 * attempt, 100) * (0.5 + Math.random())); // spread out, so the openers do not meet again
      }
    }
  }

  private static openOnce(path: string): OutboxFile {
    mkdirSync(dirname(path), { recursive: true });
    let db: Database.Database;
    try {
      db = new Database(path);
    } catch (error) {
      throw new StoreUnavailableError(path, `the outbox cannot be opened: ${(error as Error).message}`, 'Check that the folder exists and you may write to it, or set ROLLOFF_OUTBOX_DIR to another folder.');
    }
    try {
      db.pragma('busy_timeout = 5000'); // first: another bench process may be creating the same outbox
      db.pragma('journal_mode = WAL');
      db.pragma('synchronous = FULL'); // an entry is on disk before the sweep moves on
      // Look and create under the write lock, in one transaction: a second process opening the outbox at the
      // same moment waits, then finds the tables and the format number both there, never one without the other.
      db.transaction(() => {
        const version = db.pragma('user_version', { simple: true }) as number;
        const tables = (db.prepare("SELECT count(*) AS n FROM sqlite_master WHERE type = 'table'").get() as { n: number }).n;
        if (version === 0 && tables === 0) {
          db.exec(SCHEMA);
          db.pragma(`user_version = ${OUTBOX_FORMAT}`);
        } else if (version !== OUTBOX_FORMAT) {
          throw new StoreDamagedError(path, `an outbox of format ${version}, not ${OUTBOX_FORMAT}, or another program's database`);
        }
      }).immediate();
      return new OutboxFile(path, db);
    } catch (error) {
      db.close();
      if (error instanceof StoreDamagedError) throw error;
      if (error instanceof Database.SqliteError && error.code.startsWith('SQLITE_BUSY')) throw new OutboxBusyError(error.message);
      throw new StoreDamagedError(path, (error as Error).message);
    }
  }

  append(runId: number, writer: OutboxWriter, write: OutboxWrite): void {
    this.statements.append.run(runId, writer.ownerId, writer.pid, writeToJson(write));
  }

  /** This writer's entries, oldest first. */
  entriesOf(ownerId: string): OutboxEntry[] {
    return (this.statements.entriesOf.all(ownerId) as Array<{ seq: number; run_id: number; owner_id: string; write: string }>).map((row) => ({
      seq: row.seq,
      runId: row.run_id,
      ownerId: row.owner_id,
      write: writeFromJson(row.write),
    }));
  }

  remove(seq: number): void {
    this.statements.remove.run(seq);
  }

  pendingOfRun(runId: number): number {
    return (this.statements.countOfRun.get(runId) as { n: number }).n;
  }

  pendingOf(ownerId: string): number {
    return (this.statements.countOf.get(ownerId) as { n: number }).n;
  }

  /** The writers that left entries (or an open offline period) for this run, or for any run. */
  ownersOf(runId?: number): OutboxWriter[] {
    const rows = (runId === undefined ? this.statements.owners.all() : this.statements.ownersOfRun.all(runId, runId)) as Array<{ owner_id: string; pid: number }>;
    return rows.map((row) => ({ ownerId: row.owner_id, pid: row.pid }));
  }

  /** Takes over a gone writer's entries and offline periods, in one transaction, so two adopters cannot both send them. */
  adopt(from: string, to: OutboxWriter): void {
    this.db.transaction(() => {
      this.statements.adoptPending.run({ from, to: to.ownerId, pid: to.pid });
      this.statements.adoptOffline.run({ from, to: to.ownerId, pid: to.pid });
    }).immediate();
  }

  /** The run's bench is cut off since `since` (kept if already marked). */
  markOffline(runId: number, since: string, writer: OutboxWriter): void {
    this.statements.markOffline.run(runId, since, writer.ownerId, writer.pid);
  }

  offlineSince(runId: number): string | undefined {
    return (this.statements.offlineSince.get(runId) as { since: string } | undefined)?.since;
  }

  offlineRunsOf(ownerId: string): Array<{ runId: number; since: string }> {
    return (this.statements.offlineOf.all(ownerId) as Array<{ run_id: number; since: string }>).map((row) => ({ runId: row.run_id, since: row.since }));
  }

  endOffline(runId: number): void {
    this.statements.endOffline.run(runId);
  }

  close(): void {
    if (this.db.open) this.db.close();
  }
}
