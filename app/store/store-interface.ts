/**
 * What the service, the sweep runner, the read model and the exports need
 * from a database, with no hint of which one it is. SQLite (app/store/sqlite-store.ts,
 * one file, the embedded default) and PostgreSQL (one lab-wide database) implement it,
 * and both pass the same conformance suite (test/store-conformance/).
 *
 * Every method is asynchronous, so a server database fits behind it; an
 * implementation over a synchronous binding resolves at once.
 *
 * Guarantees every implementation keeps (the conformance suite checks them):
 * - insertPoint is durable when its promise resolves (one transaction per point,
 *   fully synchronous commit), so a power cut loses at most the point being written;
 * - a run holds at most one point per step: a second one is refused with
 *   DuplicateStepError and the stored one is kept;
 * - loadPoints returns the points in step order, whatever order they were stored in;
 * - bulk methods (insertPoints, insertPointsOfRuns, createRuns) are all or nothing;
 * - the schema is migrated on open with the version recorded, and a database of a
 *   newer schema (StoreVersionError) or a damaged one (StoreDamagedError) is refused
 *   before anything is written;
 * - unknown ids are RecordNotFoundError, bad values ValidationError naming the field,
 *   and a read-only store refuses every write with StoreUnavailableError.
 */
import type {
  OfflinePeriod,
  BuildRecord,
  DesignRecord,
  PointColumns,
  RunEvent,
  RunFigures,
  RunStatus,
  RunSummary,
  Verdict,
} from '../contract/contract';
import type {
  BenchSettings,
  BenchClaimResult,
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
  OwnedRunResult,
  OwnerCondition,
  PointBatch,
  BuildImport,
  DesignImport,
  RunImport,
  RunTransfer,
  ScheduleImport,
  UidKind,
  RunClaimant,
  RunClaimResult,
  RunFilter,
  RunOwnership,
  ScheduleRecord,
  StoreChange,
  StoreChangeFeed,
  StoredNoiseRecords,
  StoredRun,
  StoredRunSummary,
} from './types';

/** Designs as drawn and the builds (physical realisations, with measured part values) of them. */
export interface DesignAndBuildStore {
  saveDesign(input: NewDesign): Promise<DesignRecord>;
  getDesign(designId: number): Promise<DesignRecord>;
  /** Oldest first. */
  listDesigns(): Promise<DesignRecord[]>;
  /** Refuses an unknown design id (RecordNotFoundError) and non-finite part values. */
  createBuild(input: NewBuild): Promise<BuildRecord>;
  getBuild(buildId: number): Promise<BuildRecord>;
  /** Oldest first; all builds, or those of one design. */
  listBuilds(designId?: number): Promise<BuildRecord[]>;
}

/** Runs: what was asked and planned, their status, and the figures found. */
export interface RunStore {
  /** A new run in status 'planned', with its plan stored beside it. */
  createRun(input: NewRun): Promise<StoredRun>;
  /** Many runs in one transaction (imports, benchmarks); all or nothing, in input order. */
  createRuns(inputs: readonly NewRun[]): Promise<StoredRun[]>;
  /**
   * First 'running' stamps startedAt; a finished status (done, stopped, failed) stamps endedAt; 'running' again clears it.
   * `at` (ISO 8601) is when it happened, for a change sent late (the outbox); default now.
   * With condition.asOwner, only while that owner owns the run, in the same statement: else RunTakenOverError, nothing written.
   */
  updateRunStatus(runId: number, status: RunStatus, at?: string, condition?: OwnerCondition): Promise<StoredRun>;
  setRunResults(runId: number, figures: RunFigures, verdict: Verdict | null): Promise<StoredRun>;
  getRun(runId: number): Promise<StoredRun>;
  /** Newest first, at most filter.limit (default 200), each with its recorded owner (null when none). */
  listRuns(filter?: RunFilter): Promise<StoredRunSummary[]>;
  /**
   * Runs left running or paused (oldest first) that nobody drives: no owner, or an
   * owner whose heartbeat is older than staleAfterMs (a crash or power cut). A run
   * with a live owner is never in this list.
   */
  findInterruptedRuns(staleAfterMs: number): Promise<StoredRun[]>;

  // ── run ownership (owner, heartbeat, take-over) ──────────────────────────
  // A run being driven has one owner. The owner renews its heartbeat every few
  // seconds; a run whose heartbeat is older than staleAfterMs may be taken over.

  /**
   * Takes a run for claimant in ONE conditional update: it succeeds when the run
   * has no owner, is already the claimant's, or its owner's heartbeat is older than
   * staleAfterMs (by the store's clock). Of two claimants racing for a stale run,
   * even in the same millisecond, exactly one gets claimed: true; the other gets the
   * winner. Claiming stamps since and heartbeatAt with now.
   */
  claimRun(runId: number, claimant: RunClaimant, staleAfterMs: number): Promise<RunClaimResult>;
  /**
   * claimRun for a run about to command its bench's instruments again (a resume):
   * in ONE transaction, also refused when ANOTHER run of the run's bench has a live
   * owner, the claimant itself included (as createOwnedRun checks for a new run);
   * then nothing changes and the result names that run and its owner. Else it is
   * claimRun: claimed, or claimed: false with the run's own live owner. A run
   * stored before benches had names (benchName '') is of benchOfUnnamedRun, and
   * is recorded as that bench's with the claim, so it holds the bench from then on.
   */
  claimRunOnFreeBench(runId: number, claimant: RunClaimant, staleAfterMs: number, benchOfUnnamedRun: string): Promise<BenchClaimResult>;
  /** Renews the heartbeat; false (and nothing changed) when ownerId no longer owns the run. */
  renewRunHeartbeat(runId: number, ownerId: string): Promise<boolean>;
  /**
   * Starts a run on a bench: creates it already owned by claimant, in ONE
   * transaction, unless a run of the same bench (input.benchName, required here)
   * has a live owner, the claimant itself included; live means a heartbeat no
   * older than staleAfterMs by the store's clock. Then nothing is created and the
   * result names that run and its owner. Of starts racing on one bench, from one
   * process or many, exactly one creates its run; the bench is free again when
   * that owner releases the run or its heartbeat goes stale.
   */
  createOwnedRun(input: NewRun, claimant: RunClaimant, staleAfterMs: number): Promise<OwnedRunResult>;
  /** Gives the run up (its end, a pause); a no-op when ownerId does not own it. */
  releaseRun(runId: number, ownerId: string): Promise<void>;
  /** The run's owner, or undefined when nobody drives it. */
  getRunOwnership(runId: number): Promise<RunOwnership | undefined>;
  /**
   * Notes that the run's bench could not reach the store from `from` to `to`
   * (its outbox kept the points). Recording the same period again (same from)
   * changes nothing, so a replay after a crash cannot double it.
   */
  recordOfflinePeriod(runId: number, period: OfflinePeriod): Promise<void>;
}

/** The measured steps of a run. */
export interface PointStore {
  /**
   * One point in its own transaction: durable when this resolves. A stored step is refused with DuplicateStepError.
   * With condition.asOwner, only while that owner owns the run, in the same transaction: else RunTakenOverError, nothing written.
   */
  insertPoint(runId: number, point: NewPoint, condition?: OwnerCondition): Promise<void>;
  /** Many points of one run in one transaction; all or nothing. */
  insertPoints(runId: number, points: readonly NewPoint[]): Promise<void>;
  /** Points of many runs in one transaction (bulk imports); all or nothing. */
  insertPointsOfRuns(batches: readonly PointBatch[]): Promise<void>;
  /** A run's points in step order, columnar (missing values NaN). RecordNotFoundError for an unknown run. */
  loadPoints(runId: number): Promise<PointColumns>;
  /** One past the highest stored step, points and noise records alike (0 for a run with none): where a resumed run continues. */
  nextStep(runId: number): Promise<number>;
}

/** The records of a noise run (one per step, like points: durable, never two for one step). */
export interface NoiseRecordStore {
  /**
   * One record in its own transaction, counted in the run's point count: durable when this resolves. A stored step is refused with DuplicateStepError.
   * With condition.asOwner, as insertPoint: only while that owner owns the run, else RunTakenOverError, nothing written.
   */
  insertNoiseRecord(runId: number, record: NewNoiseRecord, condition?: OwnerCondition): Promise<void>;
  /** A run's records in step order. RecordNotFoundError for an unknown run. */
  loadNoiseRecords(runId: number): Promise<StoredNoiseRecords>;
}

/** The log lines of a run (info, warning, error), in the order they were appended. */
export interface RunEventStore {
  /** With condition.asOwner, only while that owner owns the run, in the same statement: else RunTakenOverError, nothing written. */
  appendEvent(runId: number, level: RunEvent['level'], message: string, at?: string, condition?: OwnerCondition): Promise<RunEvent>;
  listEvents(runId: number): Promise<RunEvent[]>;
}

/** Through-calibrations, per pair of generator and meter (NewCalibration.instrumentPairKey). */
export interface CalibrationStore {
  saveCalibration(input: NewCalibration): Promise<CalibrationRecord>;
  /** The newest calibration of this generator and meter, or undefined when they were never calibrated together. */
  latestCalibration(instrumentPairKey: string): Promise<CalibrationRecord | undefined>;
}

/** Repeated sweeps of one build. */
export interface ScheduleStore {
  createSchedule(input: NewSchedule): Promise<ScheduleRecord>;
  getSchedule(scheduleId: number): Promise<ScheduleRecord>;
}

/** Every instrument identity seen at an address (the record's bench table). */
export interface InstrumentStore {
  /** First sighting is kept, last sighting and role are updated. */
  recordInstrument(sighting: InstrumentSighting): Promise<InstrumentRecord>;
  /** Most recently seen first. */
  listInstruments(): Promise<InstrumentRecord[]>;
}

/** Settings that belong to one bench (its maximum stimulus), keyed by its bench key (app/bench/bench-key.ts). */
export interface BenchSettingsStore {
  /** undefined when nothing was ever saved for this bench. */
  getBenchSettings(benchKey: string): Promise<BenchSettings | undefined>;
  /** Replaces this bench's settings. */
  saveBenchSettings(benchKey: string, settings: BenchSettingsInput): Promise<BenchSettings>;
}

/**
 * Moving history between stores (rolloff store copy, app/store/copy/): rows as
 * they were, timestamps and stable ids (uid) kept, ids the target's own.
 */
export interface HistoryTransferStore {
  /** This store's ids of the records with these uids (those it holds). */
  idsOfUids(kind: UidKind, uids: readonly string[]): Promise<Map<string, number>>;
  /** A run as stored, raw readings, events and offline periods included. */
  exportRun(runId: number): Promise<RunTransfer>;
  importDesign(design: DesignImport): Promise<number>;
  importBuild(build: BuildImport): Promise<number>;
  importSchedule(schedule: ScheduleImport): Promise<number>;
  /** Runs with their points, events and offline periods, in one transaction: all or nothing; new ids in input order. */
  importRuns(runs: readonly RunImport[]): Promise<number[]>;
}

/** Where the store is, its schema, and its end. */
export interface StoreLifecycle {
  /** What the user named with --db: a file path, or a database URL without its password. */
  readonly location: string;
  readonly readonly: boolean;
  /** Schema versions applied by this open (empty when the database was current). */
  readonly appliedMigrations: readonly number[];
  /** The schema version recorded in the database. */
  schemaVersion(): Promise<number>;
  /** The database's own consistency check; [] when sound (slow on big databases). */
  integrityProblems(): Promise<string[]>;
  /** Idempotent. */
  close(): Promise<void>;
}

/** The whole store, as the service holds it. */
/**
 * Writes by other processes to a store shared between machines (PostgreSQL), as
 * they commit; a store only one process writes (SQLite) does not offer it.
 * The store's own writes are not reported back to it when the server pushes
 * changes; when polling they may be, so a listener skips the runs it drives.
 */
export interface SharedStoreChanges {
  watchChanges?(listener: (change: StoreChange) => void, options?: { forcePolling?: boolean; pollIntervalMs?: number }): Promise<StoreChangeFeed>;
}

export interface RolloffStore
  extends SharedStoreChanges, DesignAndBuildStore,
    RunStore,
    PointStore,
    NoiseRecordStore,
    RunEventStore,
    CalibrationStore,
    ScheduleStore,
    InstrumentStore,
    BenchSettingsStore,
    HistoryTransferStore,
    StoreLifecycle {}

/** The few methods the sweep runner uses: a fake of these is enough to drive it. */
export type SweepStore = Pick<RolloffStore, 'nextStep' | 'updateRunStatus' | 'appendEvent' | 'insertPoint' | 'loadPoints'>;

/** What the read model (run detail, analysis, exports) reads. */
export type RunReadStore = Pick<RolloffStore, 'getRun' | 'loadPoints' | 'loadNoiseRecords' | 'listEvents' | 'getBuild' | 'getDesign'>;
