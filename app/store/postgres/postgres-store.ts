/**
 * The PostgreSQL store: one lab-wide database for many benches, behind the
 * same RolloffStore interface as the SQLite file and passing the same
 * conformance suite. A small pool of connections (node-postgres); each point
 * is one statement (its insert and the run's point count together), committed
 * with synchronous_commit=on, so it is on the server's disk when insertPoint
 * resolves. Bulk work runs in one transaction on one connection.
 * Rows become records in ../row-mapping.ts, shared with the SQLite store.
 */
import pg from 'pg';
import type { PoolClient, QueryConfig, QueryResultRow } from 'pg';
import type {
  BuildRecord,
  DesignRecord,
  PointColumns,
  OfflinePeriod,
  RunEvent,
  RunFigures,
  RunStatus,
  Verdict,
} from '../../contract/contract';
import { DuplicateStepError, RecordNotFoundError, RunTakenOverError, StoreUnavailableError } from '../errors';
import { identityKey } from '../identity-key';
import {
  FINISHED_STATUSES,
  checkActualValues,
  checkBenchKey,
  checkBenchSettings,
  checkBuildLabel,
  checkCalibration,
  checkDesignName,
  checkEventLevel,
  checkNoiseRecord,
  noiseRecordAt,
  checkPoint,
  checkPoints,
  checkRunFilter,
  checkRunStatus,
  checkSchedule,
  checkNewRun,
  requireId,
  requireText,
  toJson,
  checkOwnerCondition,
  checkRunClaimant,
  checkStaleAfter,
  checkBenchToReserve,
  checkOfflinePeriod,
  checkRunBenchName,
  checkRunImports,
  checkInstant,
  checkUids,
} from '../record-checks';
import { noiseRecordsFromRows, nullable, ownershipFromRow, pointColumnsFromRows, pointValues, rowMapping, storedPointFromRow, type Row, type RowMapping } from '../row-mapping';
import type { RolloffStore } from '../store-interface';
import type {
  BenchSettings,
  BenchSettingsInput,
  CalibrationRecord,
  InstrumentRecord,
  InstrumentSighting,
  NewBuild,
  NewCalibration,
  NewDesign,
  NewNoiseRecord,
  NewPoint,
  NewRun,
  NewSchedule,
  PointBatch,
  RunFilter,
  ScheduleRecord,
  StoreChange,
  StoreChangeFeed,
  StoreOpenOptions,
  StoredNoiseRecords,
  StoredRun,
  StoredRunSummary,
  OwnerCondition,
  RunClaimant,
  RunClaimResult,
  OwnedRunResult,
  BenchClaimResult,
  RunOwnership,
  BuildImport,
  DesignImport,
  RunImport,
  RunTransfer,
  ScheduleImport,
  StoredPoint,
  UidKind,
} from '../types';
import { randomUUID } from 'node:crypto';
import { CHANGE_CHANNEL, changePayload, openChangeFeed } from './change-feed';
import { connectionFailure, isUnreachable, poolConfigFor, redactDatabaseUrl, sqlState } from './connection';
import { loadPostgresMigrations, migratePostgres, schemaVersionIn } from './migrations';

/** node-postgres parses json columns and booleans itself. */
type Queryable = Pick<PoolClient, 'query'>;

/** Type OIDs (pg_type.oid, stable across PostgreSQL versions). */
const INT8_OID = 20;
const TIMESTAMPTZ_OID = 1184;

/** Ids are bigint in the schema but far below 2^53; timestamps come back as the contract's ISO 8601 UTC text. */
const typeParsers = {
  getTypeParser(oid: number, format?: 'text' | 'binary') {
    if (oid === INT8_OID) return (text: string) => Number(text);
    if (oid === TIMESTAMPTZ_OID) return (text: string) => new Date(text.replace(' ', 'T').replace(/([+-]\d\d)$/, '$1:00')).toISOString();
    return pg.types.getTypeParser(oid, format as 'text');
  },
} as pg.CustomTypesConfig;

function isoNow(): string {
  return new Date().toISOString();
}

/** Any ISO 8601 form the checks accepted (offsets included), as one UTC instant for timestamptz. */
function instant(text: string): string {
  return new Date(Date.parse(text)).toISOString();
}

/** SQLSTATEs (PostgreSQL documentation, appendix A "Error Codes"). */
const UNIQUE_VIOLATION = '23505';
const FOREIGN_KEY_VIOLATION = '23503';
const READ_ONLY_TRANSACTION = '25006';

const POINT_COLUMNS = `run_id, step, stimulus, amplitude_vpp, input_reading, output_reading,
  gain_db, gain_u_db, phase_deg, phase_u_deg, output_v, flags, measured_at`;

const OWNER_COLUMNS = 'owner_id, owner_pid, owner_host, owner_label, owner_since_ms, owner_heartbeat_ms';

/**
 * First key of the transaction-level advisory lock that queues starts on one
 * bench (the second is the bench name's hash): the bytes of "roll". Two-key
 * locks do not overlap the migration's one-key lock (PostgreSQL documentation,
 * "Advisory Lock Functions").
 */
const BENCH_LOCK_CLASS = 0x726f6c6c;

const NOISE_RECORD_COLUMNS = 'run_id, step, sample_rate_hz, segments, degrees_of_freedom, rms_v, mean_v, flags, measured_at, psd_v2_per_hz';

const RUN_SUMMARY_COLUMNS = `r.id, r.uid, r.build_id, b.label AS build_label, d.name AS design_name, r.kind, r.status,
  r.started_at, r.ended_at, r.point_count, r.planned_count, r.simulated, r.bench_name,
  r.owner_id, r.owner_pid, r.owner_host, r.owner_label, r.owner_since_ms, r.owner_heartbeat_ms`;

export class PostgresStore implements RolloffStore {
  readonly location: string;
  readonly readonly: boolean;
  readonly appliedMigrations: readonly number[];
  private readonly pool: pg.Pool;
  private readonly now: () => string;
  private closed = false;
  /** Names this store's writes in change notifications, so its own feed skips them. */
  private readonly origin = randomUUID();
  /** Settings for a feed's LISTEN connection. */
  private listenConfig: pg.ClientConfig = {};
  private readonly feeds = new Set<StoreChangeFeed>();

  private constructor(location: string, pool: pg.Pool, readonly_: boolean, applied: number[], now: () => string, serverClockAheadMs: number) {
    this.location = location;
    this.pool = pool;
    this.readonly = readonly_;
    this.appliedMigrations = applied;
    this.now = now;
    this.serverClockAheadMs = serverClockAheadMs;
    this.toRecord = rowMapping({ json: (value) => value, flag: (value) => value === true, ownerTimeToLocalMs: (ms) => ms - serverClockAheadMs });
  }

  /**
   * How far the server's clock is ahead of this bench's (ms), measured when the
   * store opens. Owner times (claims, heartbeats, staleness) are written and
   * compared in the server's clock, so benches whose clocks disagree still agree
   * on whose heartbeat is fresh; they are read back in this bench's clock.
   */
  private readonly serverClockAheadMs: number;
  private readonly toRecord: RowMapping;

  private ownershipOf(row: Row): RunOwnership | undefined {
    return ownershipFromRow(row, (ms) => ms - this.serverClockAheadMs);
  }

  /**
   * Connects and migrates. A database of a newer schema or of another program
   * is refused before anything is written; an unreachable server, a refused
   * login or a missing database is a StoreUnavailableError saying which.
   */
  static async open(databaseUrl: string, options: StoreOpenOptions = {}): Promise<PostgresStore> {
    const shown = redactDatabaseUrl(databaseUrl);
    const readonly = options.readonly === true;
    const now = options.now ?? isoNow;
    const migrations = loadPostgresMigrations(options.migrationsDir);
    const config = poolConfigFor(databaseUrl, 'rolloff');
    if (readonly) config.options = `${config.options} -c default_transaction_read_only=on`;
    const pool = new pg.Pool({ ...config, types: typeParsers });
    // An idle connection dropped by the server (restart, network) must not crash the process; the next query reconnects.
    pool.on('error', () => {});
    let client: PoolClient;
    try {
      client = await pool.connect();
    } catch (error) {
      await pool.end().catch(() => {});
      throw connectionFailure(shown, error);
    }
    try {
      const applied = await migratePostgres(client, shown, migrations, { readonly, now });
      const serverClockAheadMs = await serverClockAhead(client, now);
      client.release();
      const store = new PostgresStore(shown, pool, readonly, applied, now, serverClockAheadMs);
      store.listenConfig = { ...config, types: typeParsers };
      return store;
    } catch (error) {
      client.release();
      await pool.end().catch(() => {});
      if (isUnreachable(error)) throw connectionFailure(shown, error);
      throw error;
    }
  }

  async schemaVersion(): Promise<number> {
    return this.withClient((client) => schemaVersionIn(client));
  }

  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    for (const feed of [...this.feeds]) await feed.stop();
    this.feeds.clear();
    await this.pool.end();
  }

  // ── plumbing ───────────────────────────────────────────────────────────

  /** Turns the server's failures into the store's named errors. */
  private translate(error: unknown): unknown {
    if (sqlState(error) === READ_ONLY_TRANSACTION) {
      return new StoreUnavailableError(this.location, 'is open read-only', 'Open the database without read-only to change it.');
    }
    if (isUnreachable(error)) return connectionFailure(this.location, error);
    return error;
  }

  private async query<R extends QueryResultRow = Row>(text: string | QueryConfig, values?: unknown[], on: Queryable = this.pool): Promise<pg.QueryResult<R>> {
    if (this.closed) throw new StoreUnavailableError(this.location, 'is closed', 'Open the store again.');
    try {
      return await (on.query as (q: string | QueryConfig, v?: unknown[]) => Promise<pg.QueryResult<R>>)(text, values);
    } catch (error) {
      throw this.translate(error);
    }
  }

  private async withClient<T>(work: (client: PoolClient) => Promise<T>): Promise<T> {
    if (this.closed) throw new StoreUnavailableError(this.location, 'is closed', 'Open the store again.');
    let client: PoolClient;
    try {
      client = await this.pool.connect();
    } catch (error) {
      throw connectionFailure(this.location, error);
    }
    try {
      return await work(client);
    } finally {
      client.release();
    }
  }

  /** One transaction on one connection; all or nothing. */
  private async transaction<T>(work: (client: PoolClient) => Promise<T>): Promise<T> {
    return this.withClient(async (client) => {
      await this.query('BEGIN', [], client);
      try {
        const result = await work(client);
        await this.query('COMMIT', [], client);
        return result;
      } catch (error) {
        await client.query('ROLLBACK').catch(() => {});
        throw this.translate(error);
      }
    });
  }

  private requireWritable(): void {
    if (this.readonly) throw new StoreUnavailableError(this.location, 'is open read-only', 'Open the database without read-only to change it.');
  }

  // ── designs and builds ─────────────────────────────────────────────────

  async saveDesign(input: NewDesign): Promise<DesignRecord> {
    this.requireWritable();
    const name = checkDesignName(input.name);
    const { rows } = await this.query('INSERT INTO designs (uid, name, design_json, created_at) VALUES ($4, $1, $2, $3) RETURNING *', [
      name,
      toJson(input.design, 'design'),
      instant(this.now()),
      randomUUID(),
    ]);
    return this.toRecord.design(rows[0]);
  }

  async getDesign(designId: number): Promise<DesignRecord> {
    const { rows } = await this.query('SELECT * FROM designs WHERE id = $1', [requireId(designId, 'designId')]);
    if (rows.length === 0) throw new RecordNotFoundError('design', designId);
    return this.toRecord.design(rows[0]);
  }

  async listDesigns(): Promise<DesignRecord[]> {
    return (await this.query('SELECT * FROM designs ORDER BY id')).rows.map(this.toRecord.design);
  }

  async createBuild(input: NewBuild): Promise<BuildRecord> {
    this.requireWritable();
    await this.getDesign(input.designId);
    const label = checkBuildLabel(input.label);
    const actualValues = checkActualValues(input.actualValues);
    try {
      const { rows } = await this.query(
        'INSERT INTO builds (uid, design_id, label, notes, actual_values_json, created_at) VALUES ($6, $1, $2, $3, $4, $5) RETURNING *',
        [input.designId, label, requireText(input.notes ?? '', 'build.notes'), toJson(actualValues, 'build.actualValues'), instant(this.now()), randomUUID()],
      );
      return this.toRecord.build(rows[0]);
    } catch (error) {
      if (sqlState(error) === FOREIGN_KEY_VIOLATION) throw new RecordNotFoundError('design', input.designId);
      throw error;
    }
  }

  async getBuild(buildId: number): Promise<BuildRecord> {
    const { rows } = await this.query('SELECT * FROM builds WHERE id = $1', [requireId(buildId, 'buildId')]);
    if (rows.length === 0) throw new RecordNotFoundError('build', buildId);
    return this.toRecord.build(rows[0]);
  }

  async listBuilds(designId?: number): Promise<BuildRecord[]> {
    const id = designId === undefined ? null : requireId(designId, 'designId');
    return (await this.query('SELECT * FROM builds WHERE ($1::bigint IS NULL OR design_id = $1) ORDER BY id', [id])).rows.map(this.toRecord.build);
  }

  // ── instruments ────────────────────────────────────────────────────────

  async recordInstrument(sighting: InstrumentSighting): Promise<InstrumentRecord> {
    this.requireWritable();
    const identityText = identityKey(sighting.identity);
    const address = requireText(sighting.address, 'instrument.address');
    const at = instant(sighting.at ?? this.now());
    const { rows } = await this.query(
      `INSERT INTO instruments (role, identity_text, identity_json, address, first_seen_at, last_seen_at)
       VALUES ($1, $2, $3, $4, $5, $5)
       ON CONFLICT (identity_text, address) DO UPDATE SET last_seen_at = excluded.last_seen_at, role = excluded.role
       RETURNING *`,
      [sighting.role, identityText, toJson(sighting.identity, 'instrument.identity'), address, at],
    );
    return this.toRecord.instrument(rows[0]);
  }

  async listInstruments(): Promise<InstrumentRecord[]> {
    return (await this.query('SELECT * FROM instruments ORDER BY last_seen_at DESC, id DESC')).rows.map(this.toRecord.instrument);
  }

  // ── runs ───────────────────────────────────────────────────────────────

  async createRun(input: NewRun): Promise<StoredRun> {
    const [run] = await this.createRuns([input]);
    return run;
  }

  async createRuns(inputs: readonly NewRun[]): Promise<StoredRun[]> {
    this.requireWritable();
    const ids = await this.transaction(async (client) => {
      const created: number[] = [];
      for (const input of inputs) created.push(await this.insertRun(input, client));
      return created;
    });
    const stored: StoredRun[] = [];
    for (const id of ids) stored.push(await this.getRun(id));
    return stored;
  }

  private async insertRun(input: NewRun, client: PoolClient): Promise<number> {
    const run = checkNewRun(input);
    if ((await this.query('SELECT 1 FROM builds WHERE id = $1', [run.buildId], client)).rowCount === 0) throw new RecordNotFoundError('build', run.buildId);
    if (run.scheduleId !== null && (await this.query('SELECT 1 FROM schedules WHERE id = $1', [run.scheduleId], client)).rowCount === 0) {
      throw new RecordNotFoundError('schedule', run.scheduleId);
    }
    const { rows } = await this.query<{ id: number }>(
      `WITH run AS (
         INSERT INTO runs (uid, build_id, kind, request_json, planned_count, status, created_at, software_version, bench_json, operator, notes, simulated, schedule_id, bench_name)
         VALUES ($14, $1, $2, $3, $4, 'planned', $5, $6, $7, $8, $9, $10, $11, $13) RETURNING id)
       INSERT INTO run_plans (run_id, plan_json) SELECT id, $12 FROM run RETURNING run_id AS id`,
      [
        run.buildId,
        run.kind,
        run.requestJson,
        run.plannedCount,
        instant(this.now()),
        run.softwareVersion,
        run.benchJson,
        run.operator,
        run.notes,
        run.simulated,
        run.scheduleId,
        run.planJson,
        run.benchName,
        randomUUID(),
      ],
      client,
    );
    return rows[0].id;
  }

  /**
   * With an owner condition the UPDATE waits for a concurrent claim's row lock and
   * re-checks owner_id against the row it left (READ COMMITTED), so a run taken
   * over a moment ago is never written by its old owner.
   */
  async updateRunStatus(runId: number, status: RunStatus, at?: string, condition?: OwnerCondition): Promise<StoredRun> {
    this.requireWritable();
    checkRunStatus(status);
    const asOwner = checkOwnerCondition(condition);
    const result = await this.query(
      `UPDATE runs SET status = $1,
         started_at = CASE WHEN $1 = 'running' THEN COALESCE(started_at, $2) ELSE started_at END,
         ended_at = CASE WHEN $3 THEN $2 WHEN $1 = 'running' THEN NULL ELSE ended_at END
       WHERE id = $4 AND ($5::text IS NULL OR owner_id = $5)`,
      [status, at === undefined ? instant(this.now()) : checkInstant(at, 'status.at'), FINISHED_STATUSES.has(status), requireId(runId, 'runId'), asOwner],
    );
    if (result.rowCount === 0) await this.refuseWrite(runId, asOwner);
    await this.notify({ kind: 'status', runId });
    return this.getRun(runId);
  }

  /** Tells other processes watching this database (watchChanges) what moved; committed with nothing else, so sent at once. */
  private async notify(change: StoreChange): Promise<void> {
    await this.query('SELECT pg_notify($1, $2)', [CHANGE_CHANNEL, changePayload(this.origin, change)]);
  }

  async watchChanges(listener: (change: StoreChange) => void, options: { forcePolling?: boolean; pollIntervalMs?: number } = {}): Promise<StoreChangeFeed> {
    const feed = await openChangeFeed({ config: this.listenConfig, pool: this.pool, origin: this.origin, ...options }, listener);
    this.feeds.add(feed);
    return {
      get mode() {
        return feed.mode;
      },
      stop: async () => {
        this.feeds.delete(feed);
        await feed.stop();
      },
    };
  }

  async setRunResults(runId: number, figures: RunFigures, verdict: Verdict | null): Promise<StoredRun> {
    this.requireWritable();
    const result = await this.query('UPDATE runs SET figures_json = $1, verdict_json = $2 WHERE id = $3', [
      toJson(figures, 'run.figures'),
      verdict === null ? null : toJson(verdict, 'run.verdict'),
      requireId(runId, 'runId'),
    ]);
    if (result.rowCount === 0) throw new RecordNotFoundError('run', runId);
    return this.getRun(runId);
  }

  async getRun(runId: number): Promise<StoredRun> {
    const { rows } = await this.query(
      `SELECT r.*, p.plan_json, b.label AS build_label, d.name AS design_name,
         (SELECT coalesce(json_agg(json_build_object('from', o.from_at, 'to', o.to_at) ORDER BY o.from_at), '[]') FROM run_offline_periods o WHERE o.run_id = r.id) AS offline_json
       FROM runs r
       JOIN run_plans p ON p.run_id = r.id JOIN builds b ON b.id = r.build_id JOIN designs d ON d.id = b.design_id
       WHERE r.id = $1`,
      [requireId(runId, 'runId')],
    );
    if (rows.length === 0) throw new RecordNotFoundError('run', runId);
    return this.toRecord.storedRun(rows[0]);
  }

  async listRuns(filter: RunFilter = {}): Promise<StoredRunSummary[]> {
    const { status, buildId, search, bench, limit } = checkRunFilter(filter);
    const { rows } = await this.query(
      `SELECT ${RUN_SUMMARY_COLUMNS}
       FROM runs r JOIN builds b ON b.id = r.build_id JOIN designs d ON d.id = b.design_id
       WHERE ($1::text IS NULL OR r.status = $1) AND ($2::bigint IS NULL OR r.build_id = $2) AND ($5::text IS NULL OR r.bench_name = $5)
         AND ($3::text IS NULL OR b.label ILIKE $3 ESCAPE '\\' OR d.name ILIKE $3 ESCAPE '\\' OR r.notes ILIKE $3 ESCAPE '\\')
       ORDER BY r.id DESC LIMIT $4`,
      [status, buildId, search, limit, bench],
    );
    return rows.map(this.toRecord.runSummary);
  }

  async findInterruptedRuns(staleAfterMs: number): Promise<StoredRun[]> {
    const staleBeforeMs = this.nowMs() - checkStaleAfter(staleAfterMs);
    const { rows } = await this.query<{ id: number }>(
      `SELECT id FROM runs WHERE status IN ('running', 'paused') AND (owner_id IS NULL OR owner_heartbeat_ms < $1) ORDER BY id`,
      [staleBeforeMs],
    );
    const runs: StoredRun[] = [];
    for (const row of rows) runs.push(await this.getRun(row.id));
    return runs;
  }

  // ── run ownership ──────────────────────────────────────────────────────

  /** Now in the server's clock (serverClockAheadMs): the clock of every owner time. */
  private nowMs(): number {
    return Date.parse(this.now()) + this.serverClockAheadMs;
  }

  /**
   * One conditional UPDATE. Under READ COMMITTED a second claimant's UPDATE waits
   * for the first's row lock, then re-checks the WHERE against the new row (its
   * fresh heartbeat and owner) and matches nothing: only one claimant wins.
   */
  async claimRun(runId: number, claimant: RunClaimant, staleAfterMs: number): Promise<RunClaimResult> {
    this.requireWritable();
    const { ownerId, pid, host, label } = checkRunClaimant(claimant, staleAfterMs);
    const nowMs = this.nowMs();
    const result = await this.query(
      `UPDATE runs SET owner_id = $2, owner_pid = $3, owner_host = $4, owner_label = $5,
         owner_since_ms = CASE WHEN owner_id = $2 THEN owner_since_ms ELSE $6 END, owner_heartbeat_ms = $6
       WHERE id = $1 AND (owner_id IS NULL OR owner_id = $2 OR owner_heartbeat_ms < $7)`,
      [requireId(runId, 'runId'), ownerId, pid, host, label, nowMs, nowMs - staleAfterMs],
    );
    const ownership = await this.getRunOwnership(runId);
    if (!ownership) throw new RecordNotFoundError('run', runId);
    return { claimed: result.rowCount === 1, ownership };
  }

  /**
   * The bench's advisory lock, as a start takes it, so the check of the bench and
   * the claim see no start or resume on that bench in between; the claim itself is
   * claimRun's conditional UPDATE, so a plain claimRun racing for the run still loses or wins whole.
   */
  async claimRunOnFreeBench(runId: number, claimant: RunClaimant, staleAfterMs: number, benchOfUnnamedRun: string): Promise<BenchClaimResult> {
    this.requireWritable();
    const { ownerId, pid, host, label } = checkRunClaimant(claimant, staleAfterMs);
    const unnamedBench = checkBenchToReserve(benchOfUnnamedRun);
    requireId(runId, 'runId');
    const nowMs = this.nowMs();
    const staleBeforeMs = nowMs - staleAfterMs;
    const outcome = await this.transaction(async (client): Promise<{ holder: Row } | { claimed: boolean }> => {
      const { rows: [run] } = await this.query('SELECT bench_name FROM runs WHERE id = $1', [runId], client);
      if (!run) throw new RecordNotFoundError('run', runId);
      const bench = (run.bench_name as string) || unnamedBench;
      await this.query('SELECT pg_advisory_xact_lock($1::integer, hashtext($2))', [BENCH_LOCK_CLASS, bench], client);
      const { rows: held } = await this.query(
        `SELECT id, ${OWNER_COLUMNS} FROM runs WHERE bench_name = $1 AND id <> $2 AND owner_id IS NOT NULL AND owner_heartbeat_ms >= $3 ORDER BY id LIMIT 1`,
        [bench, runId, staleBeforeMs],
        client,
      );
      if (held.length > 0) return { holder: held[0] };
      const result = await this.query(
        `UPDATE runs SET owner_id = $2, owner_pid = $3, owner_host = $4, owner_label = $5,
           owner_since_ms = CASE WHEN owner_id = $2 THEN owner_since_ms ELSE $6 END, owner_heartbeat_ms = $6,
           bench_name = CASE WHEN bench_name = '' THEN $8 ELSE bench_name END
         WHERE id = $1 AND (owner_id IS NULL OR owner_id = $2 OR owner_heartbeat_ms < $7)`,
        [runId, ownerId, pid, host, label, nowMs, staleBeforeMs, bench],
        client,
      );
      return { claimed: result.rowCount === 1 };
    });
    if ('holder' in outcome) return { claimed: false, benchHeldBy: { runId: outcome.holder.id as number, ownership: this.ownershipOf(outcome.holder)! } };
    const claim: RunClaimResult = { claimed: outcome.claimed, ownership: (await this.getRunOwnership(runId))! };
    return claim;
  }

  async createOwnedRun(input: NewRun, claimant: RunClaimant, staleAfterMs: number): Promise<OwnedRunResult> {
    this.requireWritable();
    const { ownerId, pid, host, label } = checkRunClaimant(claimant, staleAfterMs);
    const bench = checkBenchToReserve(input.benchName);
    const nowMs = this.nowMs();
    const outcome = await this.transaction(async (client): Promise<{ holder: Row } | { runId: number }> => {
      // Starts on one bench queue here until the one before commits; under READ COMMITTED the check below then sees its run.
      await this.query('SELECT pg_advisory_xact_lock($1::integer, hashtext($2))', [BENCH_LOCK_CLASS, bench], client);
      const { rows } = await this.query(
        `SELECT id, ${OWNER_COLUMNS} FROM runs WHERE bench_name = $1 AND owner_id IS NOT NULL AND owner_heartbeat_ms >= $2 ORDER BY id LIMIT 1`,
        [bench, nowMs - staleAfterMs],
        client,
      );
      if (rows.length > 0) return { holder: rows[0] };
      const runId = await this.insertRun(input, client);
      await this.query(
        'UPDATE runs SET owner_id = $2, owner_pid = $3, owner_host = $4, owner_label = $5, owner_since_ms = $6, owner_heartbeat_ms = $6 WHERE id = $1',
        [runId, ownerId, pid, host, label, nowMs],
        client,
      );
      return { runId };
    });
    if ('holder' in outcome) return { created: false, benchHeldBy: { runId: outcome.holder.id as number, ownership: this.ownershipOf(outcome.holder)! } };
    return { created: true, run: await this.getRun(outcome.runId), ownership: (await this.getRunOwnership(outcome.runId))! };
  }

  async renewRunHeartbeat(runId: number, ownerId: string): Promise<boolean> {
    this.requireWritable();
    const result = await this.query(`UPDATE runs SET owner_heartbeat_ms = $3 WHERE id = $1 AND owner_id = $2`, [requireId(runId, 'runId'), ownerId, this.nowMs()]);
    return result.rowCount === 1;
  }

  async releaseRun(runId: number, ownerId: string): Promise<void> {
    this.requireWritable();
    await this.query(
      `UPDATE runs SET owner_id = NULL, owner_pid = NULL, owner_host = NULL, owner_label = NULL, owner_since_ms = NULL, owner_heartbeat_ms = NULL
       WHERE id = $1 AND owner_id = $2`,
      [requireId(runId, 'runId'), ownerId],
    );
  }

  async getRunOwnership(runId: number): Promise<RunOwnership | undefined> {
    const { rows } = await this.query(
      `SELECT ${OWNER_COLUMNS} FROM runs WHERE id = $1`,
      [requireId(runId, 'runId')],
    );
    if (rows.length === 0) throw new RecordNotFoundError('run', runId);
    return this.ownershipOf(rows[0]);
  }

  async recordOfflinePeriod(runId: number, period: OfflinePeriod): Promise<void> {
    this.requireWritable();
    const { from, to } = checkOfflinePeriod(period);
    try {
      await this.query('INSERT INTO run_offline_periods (run_id, from_at, to_at) VALUES ($1, $2, $3) ON CONFLICT (run_id, from_at) DO NOTHING', [requireId(runId, 'runId'), from, to]);
    } catch (error) {
      if (sqlState(error) === FOREIGN_KEY_VIOLATION) throw new RecordNotFoundError('run', runId);
      throw error;
    }
  }

  // ── history transfer ───────────────────────────────────────────────────

  async idsOfUids(kind: UidKind, uids: readonly string[]): Promise<Map<string, number>> {
    const table = { design: 'designs', build: 'builds', run: 'runs' }[kind];
    const { rows } = await this.query<{ uid: string; id: number }>(`SELECT uid::text AS uid, id FROM ${table} WHERE uid = ANY($1::uuid[])`, [checkUids(uids)]);
    return new Map(rows.map((row) => [row.uid, row.id]));
  }

  async exportRun(runId: number): Promise<RunTransfer> {
    const run = await this.getRun(runId);
    const { rows } = await this.query(
      `SELECT step, stimulus, amplitude_vpp, input_reading, output_reading, gain_db, gain_u_db, phase_deg, phase_u_deg, output_v, flags,
         (extract(epoch FROM measured_at) * 1000)::float8 AS measured_at_ms
       FROM points WHERE run_id = $1 ORDER BY step`,
      [runId],
    );
    const points: StoredPoint[] = rows.map(storedPointFromRow);
    return { run, points, ...(run.kind === 'noise' ? { noiseRecords: await this.loadNoiseRecords(runId) } : {}), events: await this.listEvents(runId) };
  }

  async importDesign(design: DesignImport): Promise<number> {
    this.requireWritable();
    const { rows } = await this.query<{ id: number }>('INSERT INTO designs (uid, name, design_json, created_at) VALUES ($1, $2, $3, $4) RETURNING id', [
      checkUids([design.uid])[0],
      checkDesignName(design.name),
      toJson(design.design, 'design'),
      instant(requireText(design.createdAt, 'design.createdAt')),
    ]);
    return rows[0].id;
  }

  async importBuild(build: BuildImport): Promise<number> {
    this.requireWritable();
    await this.getDesign(build.designId);
    const { rows } = await this.query<{ id: number }>(
      'INSERT INTO builds (uid, design_id, label, notes, actual_values_json, created_at) VALUES ($1, $2, $3, $4, $5, $6) RETURNING id',
      [checkUids([build.uid])[0], build.designId, checkBuildLabel(build.label), requireText(build.notes ?? '', 'build.notes'),
        toJson(checkActualValues(build.actualValues), 'build.actualValues'), instant(requireText(build.createdAt, 'build.createdAt'))],
    );
    return rows[0].id;
  }

  async importSchedule(schedule: ScheduleImport): Promise<number> {
    this.requireWritable();
    await this.getBuild(schedule.buildId);
    const { count, until } = checkSchedule(schedule);
    const { rows } = await this.query<{ id: number }>(
      `INSERT INTO schedules (build_id, request_json, every_minutes, run_count, until_at, created_at) VALUES ($1, $2, $3, $4, $5, $6) RETURNING id`,
      [schedule.buildId, toJson(schedule.request, 'schedule.request'), schedule.everyMinutes, count, until === null ? null : instant(until), instant(requireText(schedule.createdAt, 'schedule.createdAt'))],
    );
    return rows[0].id;
  }

  async importRuns(runs: readonly RunImport[]): Promise<number[]> {
    this.requireWritable();
    checkRunImports(runs);
    return this.transaction(async (client) => {
      const ids: number[] = [];
      for (const { run, points, noiseRecords, events } of runs) {
        const timeOrNull = (text: string | null) => (text === null ? null : instant(text));
        let id: number;
        try {
          ({ rows: [{ id }] } = await this.query<{ id: number }>(
            `WITH run AS (
               INSERT INTO runs (uid, build_id, kind, request_json, planned_count, status, created_at, started_at, ended_at, software_version,
                 bench_json, operator, notes, simulated, schedule_id, bench_name, figures_json, verdict_json, point_count)
               VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12, $13, $14, $15, $16, $17, $18, $20) RETURNING id)
             INSERT INTO run_plans (run_id, plan_json) SELECT id, $19 FROM run RETURNING run_id AS id`,
            [checkUids([run.uid])[0], run.buildId, run.kind, toJson(run.request, 'run.request'), run.plannedCount, run.status, instant(run.createdAt),
              timeOrNull(run.startedAt), timeOrNull(run.endedAt), requireText(run.softwareVersion, 'run.softwareVersion'), toJson(run.bench ?? [], 'run.bench'),
              run.operator, run.notes, run.simulated, run.scheduleId, checkRunBenchName(run.benchName),
              run.figures === null ? null : toJson(run.figures, 'run.figures'), run.verdict === null ? null : toJson(run.verdict, 'run.verdict'),
              toJson(run.plan, 'run.plan'), points.length + (noiseRecords?.step.length ?? 0)],
            client,
          ));
        } catch (error) {
          if (sqlState(error) === FOREIGN_KEY_VIOLATION) throw run.scheduleId === null ? new RecordNotFoundError('build', run.buildId) : new RecordNotFoundError('schedule', run.scheduleId);
          throw error;
        }
        for (let start = 0; start < points.length; start += POINTS_PER_STATEMENT) {
          await this.insertPointArrays(client, id, points.slice(start, start + POINTS_PER_STATEMENT));
        }
        for (let i = 0; i < (noiseRecords?.step.length ?? 0); i++) {
          const record = noiseRecordAt(noiseRecords!, i);
          await this.query(`INSERT INTO noise_records (${NOISE_RECORD_COLUMNS}) VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10)`, [id, ...this.noiseRecordValues(record, checkNoiseRecord(record, 'noiseRecord'))], client);
        }
        for (const event of events) {
          await this.query('INSERT INTO run_events (run_id, at, level, message) VALUES ($1, $2, $3, $4)', [id, event.at, checkEventLevel(event.level), event.message], client);
        }
        for (const period of run.offlinePeriods) {
          const { from, to } = checkOfflinePeriod(period);
          await this.query('INSERT INTO run_offline_periods (run_id, from_at, to_at) VALUES ($1, $2, $3)', [id, from, to], client);
        }
        ids.push(id);
      }
      return ids;
    });
  }

  // ── points ─────────────────────────────────────────────────────────────

  async insertPoint(runId: number, point: NewPoint, condition?: OwnerCondition): Promise<void> {
    this.requireWritable();
    requireId(runId, 'runId');
    checkPoint(point, 'point');
    await this.insertCountedRow(runId, checkOwnerCondition(condition), {
      name: 'rolloff-insert-point',
      into: `points (${POINT_COLUMNS})`,
      select: `$2::integer, $3::float8, $4::float8, $5::float8, $6::float8, $7::float8, $8::float8, $9::float8, $10::float8, $11::float8, $12::integer, $13::timestamptz`,
      values: this.valuesOf(point),
    }, (error) => this.pointFailure(error, runId, [point]));
  }

  /**
   * A point or noise record of a run, inserted with the run's count and the change notification in one
   * statement: one transaction, durable (synchronous_commit=on), notified when it commits and never ahead of
   * it. The count comes first: its row lock orders this insert with a concurrent claim, and with an owner
   * condition (re-checked on the row a claim left) nothing is inserted once the run is another process's.
   * `select` uses $2 … for `values`; the notification and the owner take the two parameters after them.
   */
  private async insertCountedRow(
    runId: number,
    asOwner: string | null,
    row: { name: string; into: string; select: string; values: unknown[] },
    failure: (error: unknown) => unknown,
  ): Promise<void> {
    const notifyAt = row.values.length + 2;
    const ownerAt = notifyAt + 1;
    let inserted: number | null;
    try {
      ({ rowCount: inserted } = await this.query(
        {
          name: row.name,
          text: `WITH counted AS (UPDATE runs SET point_count = point_count + 1 WHERE id = $1 AND ($${ownerAt}::text IS NULL OR owner_id = $${ownerAt}) RETURNING id),
                 inserted AS (INSERT INTO ${row.into} SELECT id, ${row.select} FROM counted RETURNING run_id)
                 SELECT pg_notify('${CHANGE_CHANNEL}', $${notifyAt}) FROM inserted`,
        },
        [runId, ...row.values, changePayload(this.origin, { kind: 'points', runId }), asOwner],
      ));
    } catch (error) {
      throw failure(error);
    }
    if (inserted === 0) await this.refuseWrite(runId, asOwner);
  }

  /** Why a conditional write changed nothing: no such run, or (with asOwner) the run is someone else's now. */
  private async refuseWrite(runId: number, asOwner: string | null): Promise<never> {
    const ownership = await this.getRunOwnership(runId); // RecordNotFoundError for an unknown run
    if (asOwner === null) throw new RecordNotFoundError('run', runId);
    throw new RunTakenOverError(runId, ownership);
  }

  async insertPoints(runId: number, points: readonly NewPoint[]): Promise<void> {
    requireId(runId, 'runId');
    checkPoints(points, 'points');
    await this.insertPointsOfRuns([{ runId, points }]);
  }

  async insertPointsOfRuns(batches: readonly PointBatch[]): Promise<void> {
    this.requireWritable();
    batches.forEach(({ runId, points }, b) => {
      requireId(runId, `batches[${b}].runId`);
      checkPoints(points, `batches[${b}].points`);
    });
    await this.transaction(async (client) => {
      for (const batch of batches) {
        // Arrays through unnest: one statement per few thousand points instead of one per point.
        for (let start = 0; start < batch.points.length; start += POINTS_PER_STATEMENT) {
          const slice = batch.points.slice(start, start + POINTS_PER_STATEMENT);
          try {
            await this.insertPointArrays(client, batch.runId, slice);
          } catch (error) {
            throw this.pointFailure(error, batch.runId, slice);
          }
        }
        if (batch.points.length > 0) {
          const updated = await this.query('UPDATE runs SET point_count = point_count + $1 WHERE id = $2', [batch.points.length, batch.runId], client);
          if (updated.rowCount === 0) throw new RecordNotFoundError('run', batch.runId);
        }
      }
    });
  }

  private async insertPointArrays(client: PoolClient, runId: number, points: readonly NewPoint[]): Promise<void> {
    const columns: unknown[][] = Array.from({ length: 12 }, () => new Array(points.length));
    points.forEach((point, i) => {
      const values = this.valuesOf(point);
      for (let c = 0; c < 12; c++) columns[c][i] = values[c];
    });
    await this.query(
      {
        name: 'rolloff-insert-points',
        text: `INSERT INTO points (${POINT_COLUMNS})
               SELECT $1::bigint, * FROM unnest($2::integer[], $3::float8[], $4::float8[], $5::float8[], $6::float8[], $7::float8[],
                 $8::float8[], $9::float8[], $10::float8[], $11::float8[], $12::integer[], $13::timestamptz[])`,
      },
      [runId, ...columns],
      client,
    );
  }

  /** The twelve values after run_id, in POINT_COLUMNS order. */
  private valuesOf(point: NewPoint): unknown[] {
    return pointValues(point, instant(point.measuredAt ?? this.now()));
  }

  private pointFailure(error: unknown, runId: number, points: readonly { step: number }[]): unknown {
    const state = sqlState(error);
    if (state === FOREIGN_KEY_VIOLATION) return new RecordNotFoundError('run', runId);
    if (state === UNIQUE_VIOLATION) {
      // "Key (run_id, step)=(7, 3) already exists." names the step; fall back to the first point given.
      const detail = (error as { detail?: string }).detail ?? '';
      const step = /=\(\d+, (\d+)\)/.exec(detail)?.[1];
      return new DuplicateStepError(runId, step !== undefined ? Number(step) : points[0].step);
    }
    return error;
  }

  async loadPoints(runId: number): Promise<PointColumns> {
    requireId(runId, 'runId');
    const { rows } = await this.query<unknown[] & QueryResultRow>(
      {
        name: 'rolloff-load-points',
        text: `SELECT step, stimulus, amplitude_vpp, gain_db, gain_u_db, phase_deg, phase_u_deg, output_v, flags,
                 (extract(epoch FROM measured_at) * 1000)::float8 AS measured_at_ms
               FROM points WHERE run_id = $1 ORDER BY step`,
        rowMode: 'array',
      } as QueryConfig,
      [runId],
    );
    if (rows.length === 0 && (await this.query('SELECT 1 FROM runs WHERE id = $1', [runId])).rowCount === 0) throw new RecordNotFoundError('run', runId);
    return pointColumnsFromRows(rows as unknown[][]);
  }

  async nextStep(runId: number): Promise<number> {
    requireId(runId, 'runId');
    const { rows } = await this.query<{ exists: boolean; next: number }>(
      `SELECT EXISTS (SELECT 1 FROM runs WHERE id = $1) AS exists,
         GREATEST(COALESCE((SELECT MAX(step) FROM points WHERE run_id = $1), -1), COALESCE((SELECT MAX(step) FROM noise_records WHERE run_id = $1), -1)) + 1 AS next`,
      [runId],
    );
    if (!rows[0].exists) throw new RecordNotFoundError('run', runId);
    return rows[0].next;
  }

  // ── noise records ──────────────────────────────────────────────────────

  /** The values of a noise_records row after run_id, in NOISE_RECORD_COLUMNS order. */
  private noiseRecordValues(record: NewNoiseRecord, psd: Uint8Array | null): unknown[] {
    return [
      record.step, nullable(record.sampleRateHz), record.segments, record.degreesOfFreedom, nullable(record.rmsV), nullable(record.meanV),
      record.flags, instant(record.measuredAt ?? this.now()), psd === null ? null : Buffer.from(psd.buffer, psd.byteOffset, psd.byteLength),
    ];
  }

  async insertNoiseRecord(runId: number, record: NewNoiseRecord, condition?: OwnerCondition): Promise<void> {
    this.requireWritable();
    requireId(runId, 'runId');
    const psd = checkNoiseRecord(record, 'noiseRecord');
    await this.insertCountedRow(runId, checkOwnerCondition(condition), {
      name: 'rolloff-insert-noise-record',
      into: `noise_records (${NOISE_RECORD_COLUMNS})`,
      select: `$2::integer, $3::float8, $4::integer, $5::float8, $6::float8, $7::float8, $8::integer, $9::timestamptz, $10::bytea`,
      values: this.noiseRecordValues(record, psd),
    }, (error) => this.pointFailure(error, runId, [record]));
  }

  async loadNoiseRecords(runId: number): Promise<StoredNoiseRecords> {
    requireId(runId, 'runId');
    const { rows } = await this.query<unknown[] & QueryResultRow>(
      {
        name: 'rolloff-load-noise-records',
        text: `SELECT step, sample_rate_hz, segments, degrees_of_freedom, rms_v, mean_v, flags,
                 (extract(epoch FROM measured_at) * 1000)::float8 AS measured_at_ms, psd_v2_per_hz
               FROM noise_records WHERE run_id = $1 ORDER BY step`,
        rowMode: 'array',
      } as QueryConfig,
      [runId],
    );
    if (rows.length === 0 && (await this.query('SELECT 1 FROM runs WHERE id = $1', [runId])).rowCount === 0) throw new RecordNotFoundError('run', runId);
    return noiseRecordsFromRows(rows as unknown[][]);
  }

  // ── events ─────────────────────────────────────────────────────────────

  async appendEvent(runId: number, level: RunEvent['level'], message: string, at?: string, condition?: OwnerCondition): Promise<RunEvent> {
    this.requireWritable();
    const event: RunEvent = { at: at ?? this.now(), level: checkEventLevel(level), message: requireText(message, 'event.message') };
    const asOwner = checkOwnerCondition(condition);
    if (asOwner !== null) {
      // FOR SHARE waits for a concurrent claim's row lock and re-checks owner_id on the row it left (READ COMMITTED),
      // so an owner that lost the run a moment ago adds no line to it.
      const { rowCount } = await this.query(
        `INSERT INTO run_events (run_id, at, level, message)
         SELECT id, $2, $3, $4 FROM (SELECT id FROM runs WHERE id = $1 AND owner_id = $5 FOR SHARE) owned`,
        [requireId(runId, 'runId'), event.at, event.level, event.message, asOwner],
      );
      if (rowCount === 0) await this.refuseWrite(runId, asOwner);
      await this.notify({ kind: 'event', runId });
      return event;
    }
    try {
      await this.query('INSERT INTO run_events (run_id, at, level, message) VALUES ($1, $2, $3, $4)', [requireId(runId, 'runId'), event.at, event.level, event.message]);
    } catch (error) {
      if (sqlState(error) === FOREIGN_KEY_VIOLATION) throw new RecordNotFoundError('run', runId);
      throw error;
    }
    await this.notify({ kind: 'event', runId });
    return event;
  }

  async listEvents(runId: number): Promise<RunEvent[]> {
    return (await this.query<RunEvent>('SELECT at, level, message FROM run_events WHERE run_id = $1 ORDER BY id', [requireId(runId, 'runId')])).rows;
  }

  // ── calibrations ───────────────────────────────────────────────────────

  async saveCalibration(input: NewCalibration): Promise<CalibrationRecord> {
    this.requireWritable();
    const { rows } = await this.query(
      `INSERT INTO calibrations (bench_key, bench_json, frequencies_hz_json, gain_db_json, phase_deg_json, notes, created_at)
       VALUES ($1, $2, $3, $4, $5, $6, $7) RETURNING *`,
      [...checkCalibration(input), instant(this.now())],
    );
    return this.toRecord.calibration(rows[0]);
  }

  async latestCalibration(instrumentPairKey: string): Promise<CalibrationRecord | undefined> {
    const { rows } = await this.query('SELECT * FROM calibrations WHERE bench_key = $1 ORDER BY id DESC LIMIT 1', [requireText(instrumentPairKey, 'instrumentPairKey')]);
    return rows.length === 0 ? undefined : this.toRecord.calibration(rows[0]);
  }

  // ── schedules ──────────────────────────────────────────────────────────

  async createSchedule(input: NewSchedule): Promise<ScheduleRecord> {
    this.requireWritable();
    await this.getBuild(input.buildId);
    const { count, until } = checkSchedule(input);
    const { rows } = await this.query(
      `INSERT INTO schedules (build_id, request_json, every_minutes, run_count, until_at, created_at) VALUES ($1, $2, $3, $4, $5, $6) RETURNING *`,
      [input.buildId, toJson(input.request, 'schedule.request'), input.everyMinutes, count, until === null ? null : instant(until), instant(this.now())],
    );
    return this.toRecord.schedule(rows[0]);
  }

  async getSchedule(scheduleId: number): Promise<ScheduleRecord> {
    const { rows } = await this.query('SELECT * FROM schedules WHERE id = $1', [requireId(scheduleId, 'scheduleId')]);
    if (rows.length === 0) throw new RecordNotFoundError('schedule', scheduleId);
    return this.toRecord.schedule(rows[0]);
  }

  // ── per-bench settings ─────────────────────────────────────────────────

  async getBenchSettings(benchKey: string): Promise<BenchSettings | undefined> {
    const { rows } = await this.query('SELECT * FROM bench_settings WHERE bench_key = $1', [requireText(benchKey, 'benchKey')]);
    return rows.length === 0 ? undefined : this.toRecord.benchSettings(rows[0]);
  }

  async saveBenchSettings(benchKey: string, settings: BenchSettingsInput): Promise<BenchSettings> {
    this.requireWritable();
    const key = checkBenchKey(benchKey);
    const { maxStimulusVpp } = checkBenchSettings(settings);
    const { rows } = await this.query(
      `INSERT INTO bench_settings (bench_key, max_stimulus_vpp, updated_at) VALUES ($1, $2, $3)
       ON CONFLICT (bench_key) DO UPDATE SET max_stimulus_vpp = excluded.max_stimulus_vpp, updated_at = excluded.updated_at
       RETURNING *`,
      [key, maxStimulusVpp, instant(this.now())],
    );
    return this.toRecord.benchSettings(rows[0]);
  }

  // ── maintenance ────────────────────────────────────────────────────────

  /**
   * What the server's constraints cannot hold by themselves: each run's kept
   * point count against its points, and every run with its plan. (Page-level
   * checks need the amcheck extension and a superuser; the lab's administrator runs those.)
   */
  async integrityProblems(): Promise<string[]> {
    const { rows } = await this.query<{ problem: string }>(
      `SELECT format('run %s: point count %s but %s points and noise records stored', r.id, r.point_count, coalesce(p.n, 0) + coalesce(nr.n, 0)) AS problem
         FROM runs r LEFT JOIN (SELECT run_id, count(*) AS n FROM points GROUP BY run_id) p ON p.run_id = r.id
                     LEFT JOIN (SELECT run_id, count(*) AS n FROM noise_records GROUP BY run_id) nr ON nr.run_id = r.id
        WHERE r.point_count <> coalesce(p.n, 0) + coalesce(nr.n, 0)
       UNION ALL
       SELECT format('run %s: no plan stored', r.id) FROM runs r WHERE NOT EXISTS (SELECT 1 FROM run_plans p WHERE p.run_id = r.id)`,
    );
    return rows.map((row) => row.problem);
  }
}

/** Points per INSERT … unnest statement in bulk work: large enough to amortise a round trip, small enough for one message. */
const POINTS_PER_STATEMENT = 5000;

/**
 * The server's clock minus this bench's (ms): the server's time against the
 * middle of the round trip that asked it (Cristian's method), so the error is
 * at most half the round trip — well under a heartbeat on a lab network.
 */
async function serverClockAhead(client: PoolClient, now: () => string): Promise<number> {
  const sentMs = Date.parse(now());
  const { rows } = await client.query<{ ms: number }>('SELECT (extract(epoch FROM clock_timestamp()) * 1000)::float8 AS ms');
  const receivedMs = Date.parse(now());
  return Math.round(Number(rows[0].ms) - (sentMs + receivedMs) / 2); // whole ms: the owner columns are bigint
}
