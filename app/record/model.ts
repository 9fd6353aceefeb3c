/**
 * The record model: everything a test record shows, as plain JSON-safe data.
 * The JSON export IS this object, so a JSON file rebuilds the record exactly and
 * every other format (PDF, HTML, CSV) is rendered from it alone.
 *
 * Numbers that were not finite at the source (overrange, not-a-number readings)
 * are null here: JSON cannot carry NaN or ±Infinity, and the flags column says why.
 */
import type {
  InstrumentInfo,
  NoiseAcquisition,
  NoiseFigures,
  NoiseRequest,
  OfflinePeriod,
  RunEvent,
  RunFigures,
  RunStatus,
  SweepKind,
  SweepRequest,
  Verdict,
} from '../contract/contract';

/** Bumped when the record layout changes; readers refuse versions they do not know. 2: point keys named for what they hold. */
export const RECORD_FORMAT_VERSION = 2;
/** Formats a reader accepts: 1 is read back (and written again) with its own point keys, amplitudeVpp and outputV (json-record.ts). */
export type RecordFormatVersion = 1 | typeof RECORD_FORMAT_VERSION;

export type MaybeNumber = number | null;

/**
 * Columnar measured points; index i of every array is one point. Keys say what
 * they hold (app/contract/vocabulary.ts, as the CSV columns do): the output is
 * exactly one of outputVPeak (scope runs), outputVRms (meter runs) and
 * outputVDc (DC runs).
 */
export interface RecordPoints {
  step: number[];
  /** Hz for AC runs, input volts for DC runs (run.kind says which). */
  stimulus: MaybeNumber[];
  /** The generator's amplitude setting, V peak-to-peak, not a measured input. */
  stimulusSettingVpp: MaybeNumber[];
  gainDb: MaybeNumber[];
  gainUncertaintyDb: MaybeNumber[];
  phaseDeg: MaybeNumber[];
  phaseUncertaintyDeg: MaybeNumber[];
  outputVPeak?: MaybeNumber[];
  outputVRms?: MaybeNumber[];
  outputVDc?: MaybeNumber[];
  flags: number[];
  measuredAt: string[];
}

/** The output readings of a record's points, whichever key holds them. */
export function recordOutputV(points: RecordPoints): MaybeNumber[] {
  return points.outputVPeak ?? points.outputVRms ?? points.outputVDc ?? [];
}

/** Theory of the actual circuit on its own grid (Hz for AC, input volts for DC). */
export interface RecordTheory {
  stimulus: MaybeNumber[];
  gainDb: MaybeNumber[];
  phaseDeg: MaybeNumber[];
  idealGainDb: MaybeNumber[];
  idealPhaseDeg: MaybeNumber[];
  bandLowDb: MaybeNumber[] | null;
  bandHighDb: MaybeNumber[] | null;
  /** Frequency where the loop gain falls to 1 (DEVELOPERS.md "Theory"), if the theory found one. */
  gainLimitHz: number | null;
  minus3dbHz: number[];
}

/** DC log stage: the fitted transfer curve drawn over the measured points. */
export interface RecordDcFit {
  inputV: number[];
  outputV: number[];
  description: string;
}

export interface RecordDigest {
  algorithm: 'SHA-256';
  /** How the hashed bytes are made; see app/record/DIGEST.md. */
  method: string;
  hex: string;
}

export interface RecordRun {
  id: number;
  /** Stable identity, kept by a copy between stores (absent in records exported before digest version 2). */
  uid?: string;
  kind: SweepKind;
  status: RunStatus;
  startedAt: string | null;
  endedAt: string | null;
  operator: string;
  notes: string;
  simulated: boolean;
  /** Software that measured the run (may differ from the one that exported it). */
  softwareVersion: string;
  pointCount: number;
  plannedCount: number;
  plan: SweepRequest;
  /** When the bench could not reach its store and kept the points in its outbox (absent before digest version 2). */
  offlinePeriods?: OfflinePeriod[];
}

export interface RecordDesign {
  id: number | null;
  uid?: string | null;
  name: string;
  /** The design file's JSON as stored (parts, values, op-amp model). */
  content: unknown;
}

export interface RecordBuild {
  id: number;
  uid?: string;
  label: string;
  notes: string;
  /** Measured part values by part id, SI units. */
  actualValues: Record<string, number>;
  createdAt: string | null;
}

export interface RunRecord {
  recordType: 'run';
  formatVersion: RecordFormatVersion;
  title: string;
  generatedAt: string;
  /** Software that wrote this record. */
  generatedBy: string;
  safetyNotice: string[];
  run: RecordRun;
  design: RecordDesign;
  build: RecordBuild;
  bench: InstrumentInfo[];
  points: RecordPoints;
  theory: RecordTheory;
  dcFit: RecordDcFit | null;
  figures: RunFigures;
  verdict: Verdict | null;
  events: RunEvent[];
  digest: RecordDigest;
}

export interface ComparisonFigureRow {
  runId: number;
  label: string;
  figures: RunFigures;
  deltas: Partial<Record<keyof RunFigures, number>>;
  verdict: Verdict | null;
}

export interface ComparisonRecord {
  recordType: 'comparison';
  formatVersion: RecordFormatVersion;
  title: string;
  generatedAt: string;
  generatedBy: string;
  safetyNotice: string[];
  /** A run id, or "theory" when each run is compared with its own theory. */
  reference: number | 'theory';
  /** Full record of every compared run, in the order given. */
  runs: RunRecord[];
  /** Per run: stimulus and measured − reference, dB. */
  differences: Array<{ runId: number; stimulus: MaybeNumber[]; deltaDb: MaybeNumber[] }>;
  figureTable: ComparisonFigureRow[];
  /** SHA-256 over the member runs' digests, in order (see DIGEST.md). */
  digest: RecordDigest;
}

/** A noise run as the record lists it: what was asked (plan) and how the records were taken (acquisition). */
export interface RecordNoiseRun extends Omit<RecordRun, 'kind' | 'plan'> {
  kind: 'noise';
  plan: NoiseRequest;
  acquisition: NoiseAcquisition;
}

/** The stored records of a noise run, columnar (their spectra are summed up in the density). */
export interface RecordNoiseRecords {
  step: number[];
  sampleRateHz: MaybeNumber[];
  segments: number[];
  degreesOfFreedom: number[];
  rmsV: MaybeNumber[];
  meanV: MaybeNumber[];
  flags: number[];
  measuredAt: string[];
}

/** The measured density over the band with its uncertainty, beside the computed one (empty for a meter run). */
export interface RecordNoiseDensity {
  frequencyHz: MaybeNumber[];
  measuredVPerRtHz: MaybeNumber[];
  uncertaintyVPerRtHz: MaybeNumber[];
  low95VPerRtHz: MaybeNumber[];
  high95VPerRtHz: MaybeNumber[];
  computedVPerRtHz: MaybeNumber[];
}

export interface NoiseRunRecord {
  recordType: 'noise-run';
  formatVersion: typeof RECORD_FORMAT_VERSION;
  title: string;
  generatedAt: string;
  generatedBy: string;
  safetyNotice: string[];
  run: RecordNoiseRun;
  design: RecordDesign;
  build: RecordBuild;
  bench: InstrumentInfo[];
  records: RecordNoiseRecords;
  density: RecordNoiseDensity;
  figures: NoiseFigures | null;
  events: RunEvent[];
  digest: RecordDigest;
}

export type AnyRecord = RunRecord | ComparisonRecord | NoiseRunRecord;
