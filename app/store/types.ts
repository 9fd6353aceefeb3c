/**
 * Store-side record shapes. Where the contract (app/contract/contract.ts) has a
 * type, the store returns it; these cover what only the service sees.
 */
import type {
  DesignRecord,
  BuildRecord,
  InstrumentIdentity,
  OfflinePeriod,
  RunEvent,
  InstrumentInfo,
  InstrumentRole,
  NoisePlanSummary,
  NoiseRecordColumns,
  NoiseRequest,
  RunFigures,
  RunStatus,
  RunSummary,
  SweepKind,
  SweepPlanSummary,
  SweepRequest,
  Verdict,
} from '../contract/contract';

/** What a run was asked and planned, tied to its kind: a sweep's request and plan, or a noise run's. */
export type RunAsked =
  | { kind: SweepKind; request: SweepRequest; plan: SweepPlanSummary }
  | { kind: 'noise'; request: NoiseRequest; plan: NoisePlanSummary };

export type NewRun = RunAsked & NewRunCommon;

interface NewRunCommon {
  buildId: number;
  softwareVersion: string;
  bench: InstrumentInfo[];
  operator: string;
  notes: string;
  simulated: boolean;
  scheduleId?: number | null;
  /** The bench that drives the run (app/bench/bench-name.ts); '' when not known. */
  benchName?: string;
}

/**
 * A run's summary as the store keeps it: the contract's, with the owner as
 * recorded. Whether that owner is live (heartbeat fresh, process there) is the
 * service's to judge (app/service/run-ownership.ts), so it is not said here.
 */
export interface StoredRunSummary extends Omit<RunSummary, 'owner'> {
  owner: RunOwnership | null;
}

/** A run as stored: the summary plus what was asked, planned and found. */
export type StoredRun = StoredSweepRun | StoredNoiseRun;
export type StoredSweepRun = StoredRunCommon & Extract<RunAsked, { kind: SweepKind }>;
export type StoredNoiseRun = StoredRunCommon & Extract<RunAsked, { kind: 'noise' }>;

interface StoredRunCommon extends Omit<StoredRunSummary, 'kind'> {
  softwareVersion: string;
  bench: InstrumentInfo[];
  operator: string;
  notes: string;
  scheduleId: number | null;
  createdAt: string;
  figures: RunFigures | null;
  verdict: Verdict | null;
  /** When the bench could not reach the store (its outbox held the points), oldest first. */
  offlinePeriods: OfflinePeriod[];
}

export interface RunFilter {
  /** Matched (case-insensitive substring) against build label, design name and run notes. */
  search?: string;
  status?: RunStatus;
  buildId?: number;
  /** Only runs of this bench (exact name). */
  bench?: string;
  /** Newest first; default 200. */
  limit?: number;
}

/** One measured step. Missing values are NaN (stored as NULL). */
export interface NewPoint {
  step: number;
  /** Hz (AC) or input volts (DC). */
  stimulus: number;
  amplitudeVpp: number;
  /** The raw readings as the instruments gave them (volts), kept for audit. */
  inputReading?: number;
  outputReading?: number;
  gainDb: number;
  gainUncertaintyDb: number;
  phaseDeg: number;
  phaseUncertaintyDeg: number;
  outputV: number;
  flags: number;
  /** ISO 8601; defaults to now. */
  measuredAt?: string;
}

/**
 * One record of a noise run as measured: a scope record's own Welch estimate
 * (its one-sided PSD on the bins k·fs/N, k = 0 … N/2, with its segment count
 * and degrees of freedom), or one meter reading of the output's AC RMS.
 */
export interface NewNoiseRecord {
  step: number;
  /** Scope: the record's sample rate, Hz; meter: NaN. */
  sampleRateHz: number;
  segments: number;
  degreesOfFreedom: number;
  /** Scope: V²/Hz per bin; absent for a meter reading. */
  psdV2PerHz?: ArrayLike<number>;
  rmsV: number;
  meanV: number;
  flags: number;
  /** ISO 8601; defaults to now. */
  measuredAt?: string;
}

/** A noise run's records in step order, with each scope record's PSD (null for meter readings). */
export interface StoredNoiseRecords extends NoiseRecordColumns {
  psdV2PerHz: Array<Float64Array | null>;
}

export interface InstrumentSighting {
  role: InstrumentRole;
  identity: InstrumentIdentity;
  address: string;
  /** ISO 8601; defaults to now. */
  at?: string;
}

export interface InstrumentRecord {
  id: number;
  role: InstrumentRole;
  identity: InstrumentIdentity;
  address: string;
  firstSeenAt: string;
  lastSeenAt: string;
}

/** Through-calibration of one bench: corrections per frequency, subtracted from measurements. */
export interface NewCalibration {
  /**
   * Stable key of the generator and meter measured (their identities): a
   * calibration belongs to that pair, not to a bench's settings key
   * (app/bench/bench-key.ts). Stored in the column bench_key.
   */
  instrumentPairKey: string;
  bench: InstrumentInfo[];
  frequencyHz: number[];
  gainDb: number[];
  phaseDeg: number[];
  notes?: string;
}

export interface CalibrationRecord extends Required<NewCalibration> {
  id: number;
  createdAt: string;
}

export interface NewSchedule {
  buildId: number;
  request: SweepRequest;
  everyMinutes: number;
  /** Stop after this many runs, or at `until` (ISO 8601), whichever comes first; at least one is required. */
  count?: number | null;
  until?: string | null;
}

export interface ScheduleRecord {
  id: number;
  buildId: number;
  request: SweepRequest;
  everyMinutes: number;
  count: number | null;
  until: string | null;
  createdAt: string;
}

export interface NewDesign {
  name: string;
  /** The design file's JSON as given (see app/circuit for its schema). */
  design: unknown;
}

export interface NewBuild {
  designId: number;
  label: string;
  notes: string;
  /** Measured part values by part id, SI units. */
  actualValues: Record<string, number>;
}

/** One run's points for a bulk import (insertPointsOfRuns). */
export interface PointBatch {
  runId: number;
  points: readonly NewPoint[];
}

/**
 * Settings that belong to one bench, keyed by its bench key (its name and
 * whether it is the simulated bench: app/bench/bench-key.ts). null means "not
 * set on this bench".
 */
export interface BenchSettingsInput {
  /** The user's ceiling on generator output (Vpp) for this bench. */
  maxStimulusVpp: number | null;
}

export interface BenchSettings extends BenchSettingsInput {
  benchKey: string;
  /** ISO 8601: when these settings were last saved. */
  updatedAt: string;
}

export interface StoreOpenOptions {
  readonly?: boolean;
  /** Folder of NNNN_name.sql files; defaults to the shipped ones of this store's database (migrations-folder.ts). */
  migrationsDir?: string;
  /** Clock for timestamps; tests pass a fixed one. */
  now?: () => string;
}

/** A write to a shared store by another process: which run, and what moved (the listener loads the rest). */
export interface StoreChange {
  kind: 'points' | 'status' | 'event';
  runId: number;
}

/** A subscription to StoreChange; `mode` says whether the server pushes them (LISTEN) or they are polled. */
export interface StoreChangeFeed {
  readonly mode: 'listen' | 'poll';
  stop(): Promise<void>;
}

/** The process that asks to drive a run. */
export interface RunClaimant {
  /** Unique per process (and per service in it): host, pid and a random part. */
  ownerId: string;
  pid: number;
  host: string;
  /** What drives it, for people: e.g. "rolloff sweep" or "the desktop window". */
  label: string;
}

/** Who drives a run, since when, and when it last said it was alive. */
export interface RunOwnership extends RunClaimant {
  /** ISO instant the owner took the run. */
  since: string;
  /** ISO instant of the owner's latest heartbeat. */
  heartbeatAt: string;
}

/**
 * A write by the process that drives a run: applied only while asOwner still
 * owns it, checked in the same statement (or transaction) as the write, so a
 * process that lost the run to another one can never write over its state.
 */
export interface OwnerCondition {
  asOwner: string;
}

/** What claimRun found: claimed (the caller owns the run now) or the owner that kept it. */
export type RunClaimResult = { claimed: true; ownership: RunOwnership } | { claimed: false; ownership: RunOwnership };

/**
 * What createOwnedRun did: created the run, owned by the claimant, or found the
 * bench held by another run's live owner and created nothing.
 */
export type OwnedRunResult =
  | { created: true; run: StoredRun; ownership: RunOwnership }
  | { created: false; benchHeldBy: BenchHolder };

/** The run whose live owner holds a bench, and that owner. */
export interface BenchHolder {
  runId: number;
  ownership: RunOwnership;
}

/**
 * What claimRunOnFreeBench did: claimed the run, found it kept by its own live
 * owner (as claimRun), or found its bench held by another run's live owner.
 */
export type BenchClaimResult = RunClaimResult | { claimed: false; benchHeldBy: BenchHolder };
// ── history transfer (rolloff store copy) ──────────────────────────────────

/** A point as stored, raw readings and time included (NaN where nothing was read). */
export interface StoredPoint extends NewPoint {
  inputReading: number;
  outputReading: number;
  measuredAt: string;
}

/** Everything of one run a copy to another store keeps: the row as stored, its points (a noise run: its records), events and offline periods. */
export interface RunTransfer {
  run: StoredRun;
  points: StoredPoint[];
  /** A noise run's records, spectra included; absent for a sweep. */
  noiseRecords?: StoredNoiseRecords;
  events: RunEvent[];
}

/** A run to import: as exported, with buildId (and scheduleId, request.buildId) already the target store's ids. */
export type RunImport = RunTransfer;

export type DesignImport = Omit<DesignRecord, 'id'>;
export type BuildImport = Omit<BuildRecord, 'id'>;
export type ScheduleImport = Omit<ScheduleRecord, 'id'>;

/** Which kind of record a stable id (uid) names. */
export type UidKind = 'design' | 'build' | 'run';
