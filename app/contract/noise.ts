/**
 * The noise run in the contract: what a caller asks for (NoiseRequestSchema,
 * checked where it arrives), the acquisition the service plans from it, and
 * what it gives back (NoiseRunDetail). A noise run holds the generator off and
 * records the stage's output: a scope's records become a density by Welch's
 * method, a meter's AC readings are the RMS in its own bandwidth.
 */
import * as v from 'valibot';
import {
  LIMITS,
  fieldFirst,
  fieldRule,
  fields,
  oneOf,
  optional,
  positiveNumber,
  shortText,
  storeId,
  text,
  wholeNumber,
  withDefault,
  withHint,
} from './field-schemas';
import type { InstrumentInfo, OfflinePeriod, RunEvent, RunFigures, RunSummary, SweepPlanSummary } from './contract';

export const NOISE_MEASUREMENTS = ['scope', 'meter'] as const;
export type NoiseMeasurement = (typeof NOISE_MEASUREMENTS)[number];

/** Windows of Welch's segments (app/signal/welch.ts implements both). */
export const NOISE_WINDOWS = ['hann', 'rectangular'] as const;
export type NoiseWindow = (typeof NOISE_WINDOWS)[number];

/** Segment lengths a noise run takes: powers of two (the transform needs one), 2^6 … 2^16 samples. */
export const NOISE_SEGMENT_LENGTHS = { min: 64, max: 65_536 } as const;

/** Defaults of the CLI and the window (a band over the audio decades; sixteen records: each bin's density to about ±4 %). Common practice, no source. */
export const NOISE_DEFAULTS = { fromHz: 100, toHz: 20_000, records: 16, segmentLength: 4096, window: 'hann', measurement: 'scope' } as const;

const segmentLength = v.pipe(
  wholeNumber(NOISE_SEGMENT_LENGTHS.min, NOISE_SEGMENT_LENGTHS.max),
  v.check(
    (n) => (n & (n - 1)) === 0,
    (issue) => withHint(`must be a power of two, got ${issue.input}`, 'Use 1024, 4096, 16384 …: the resolution is the sample rate divided by it.'),
  ),
);

export const NoiseRequestSchema = fields(
  {
    buildId: storeId,
    /** Says what a stored request is: always "noise". */
    kind: withDefault(v.literal('noise', 'must be "noise"'), 'noise'),
    /** The band the density is reported over (scope), or the band the meter's RMS is compared with theory over, Hz. */
    fromHz: positiveNumber('Hz'),
    toHz: positiveNumber('Hz'),
    /** Scope records (each a Welch estimate of its own, averaged), or meter readings. */
    records: withDefault(wholeNumber(1, LIMITS.count), NOISE_DEFAULTS.records),
    /** Welch segment length N (scope): the resolution is the sample rate ÷ N. */
    segmentLength: withDefault(segmentLength, NOISE_DEFAULTS.segmentLength),
    window: withDefault(oneOf(NOISE_WINDOWS), NOISE_DEFAULTS.window),
    measurement: withDefault(oneOf(NOISE_MEASUREMENTS), NOISE_DEFAULTS.measurement),
    operator: withDefault(shortText(true), ''),
    notes: withDefault(text(LIMITS.textChars, true), ''),
    /** The maximum stimulus in force when the run was made (Vpp): set by the service from the bench setting, as for sweeps. */
    maxStimulusVpp: optional(
      v.custom<number>(
        () => false,
        withHint('is set by the service from the bench setting, not by the caller', 'Set the maximum stimulus on the Bench view (setMaxStimulus).'),
      ),
    ),
  },
  [
    fieldFirst('fromHz', positiveNumber('Hz')),
    fieldFirst('toHz', positiveNumber('Hz')),
    fieldRule<{ fromHz: number; toHz: number }>(({ fromHz, toHz }) =>
      toHz > fromHz ? undefined : { key: 'toHz', message: withHint(`must be above the band's start (${fromHz} Hz), got ${toHz}`, 'Give the band low to high, e.g. 100 Hz to 20 kHz.') },
    ),
  ],
);
export type NoiseRequest = v.InferOutput<typeof NoiseRequestSchema>;

/** How the records are taken, fixed when the run is planned so a resumed run goes on exactly alike. Scope-only figures are 0 for a meter run. */
export interface NoiseAcquisition {
  measurement: NoiseMeasurement;
  /** Scope: samples per second asked of it, and per record; the record's duration. Meter: its aperture per reading. */
  sampleRateHz: number;
  recordPoints: number;
  recordS: number;
  segmentLength: number;
  window: NoiseWindow;
  /** Welch overlap of segments in one record, a fraction of the segment. */
  overlap: number;
  /** The output's computed RMS noise up to the sample rate's Nyquist frequency (scope) or over the band (meter), volts: sets the scope's range. */
  expectedRmsV: number;
  /** The output's computed DC level with the input at rest, volts (offset and bias currents): the scope's range holds it too. */
  expectedDcV: number;
  /** Scope: the input range first asked for (largest input either side of 0 V), volts. */
  rangeV: number;
  /** Time the circuit is given after the generator is switched off, before the first record, bench seconds. */
  settleS: number;
  /** The generator's source resistance the stage input sees with the output off (profile), ohms: the computed density counts it. */
  sourceImpedanceOhm: number;
}

export interface NoisePlanSummary extends SweepPlanSummary {
  acquisition: NoiseAcquisition;
}

/** The stored records of a noise run, columnar: index i of every array is one record. */
export interface NoiseRecordColumns {
  step: number[];
  /** Scope: the record's sample rate as the scope reported it, Hz; meter: NaN. */
  sampleRateHz: number[];
  /** Welch segments averaged in the record, and their equivalent degrees of freedom (scope; 0 for the meter). */
  segments: number[];
  degreesOfFreedom: number[];
  /** AC RMS of the record (scope: standard deviation of its samples; meter: its reading), volts. */
  rmsV: number[];
  /** The record's mean (scope), volts; NaN for the meter. */
  meanV: number[];
  /** PointFlag bits (overrange, retried). */
  flags: number[];
  measuredAt: string[];
}

/** The measured density over the band beside the computed one, per bin (scope runs). */
export interface NoiseDensityColumns {
  frequencyHz: number[];
  /** Welch estimate, V/√Hz. */
  measuredVPerRtHz: number[];
  /** Standard uncertainty of the measured density (k = 1), V/√Hz: the estimate × 1/√(2ν). */
  uncertaintyVPerRtHz: number[];
  /** 95 % interval of the true density (χ² with ν degrees of freedom), V/√Hz. */
  low95VPerRtHz: number[];
  high95VPerRtHz: number[];
  /** The build's circuit with its input held by the generator's source resistance, V/√Hz (app/circuit solveNoise). */
  computedVPerRtHz: number[];
}

/** The figures of a noise run: measured against computed over the band. */
export interface NoiseFigures {
  fromHz: number;
  toHz: number;
  /** Records the figures rest on (records flagged overrange or not-a-number are left out). */
  recordsUsed: number;
  /** RMS over the band, volts: from the density (scope) or the readings (meter); its standard uncertainty from the spread over records. */
  measuredRmsV: number;
  measuredRmsUncertaintyV?: number;
  computedRmsV: number;
  /** Scope runs: what the estimate rests on. */
  segments?: number;
  degreesOfFreedom?: number;
  /** Relative standard uncertainty of each bin's density, 1/√(2ν). */
  densityRelativeUncertainty?: number;
  enbwHz?: number;
  resolutionHz?: number;
  /** Bins in the band, and the share of them whose 95 % interval holds the computed density (about 0.95 when they agree). */
  bins?: number;
  shareWithin95?: number;
  /** Mean of 20·log10(measured/computed) over the band's bins, dB. */
  meanDeviationDb?: number;
}

export interface NoiseRunDetail extends RunSummary {
  kind: 'noise';
  /** When the bench could not reach the store, as for sweeps (RunDetail). */
  offlinePeriods: OfflinePeriod[];
  request: NoiseRequest;
  acquisition: NoiseAcquisition;
  bench: InstrumentInfo[];
  softwareVersion: string;
  records: NoiseRecordColumns;
  density: NoiseDensityColumns;
  figures: RunFigures;
  events: RunEvent[];
}
