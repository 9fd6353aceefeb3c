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
  describeValue,
  fieldFirst,
  fieldRule,
  fields,
  maxStimulusRecorded,
  maxStimulusSetByService,
  oneOf,
  positiveNumber,
  shortText,
  storeId,
  text,
  wholeNumber,
  withDefault,
  withHint,
} from './field-schemas';
import { count, countColumn, listOf, quantity, quantityColumn, replyObject, replyText, textColumn } from './reply-fields';
import { InstrumentInfoSchema } from './bench-results';
import { OfflinePeriodSchema, RUN_SUMMARY_FIELDS, RunEventSchema, SWEEP_PLAN_SUMMARY_FIELDS } from './run-results';
import { RunFiguresSchema } from './run-figures';

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

const NOISE_REQUEST_FIELDS = {
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
  maxStimulusVpp: maxStimulusSetByService,
};

const NOISE_REQUEST_RULES = [
  fieldFirst('fromHz', positiveNumber('Hz')),
  fieldFirst('toHz', positiveNumber('Hz')),
  fieldRule<{ fromHz: number; toHz: number }>(({ fromHz, toHz }) =>
    toHz > fromHz ? undefined : { key: 'toHz', message: withHint(`must be above the band's start (${fromHz} Hz), got ${toHz}`, 'Give the band low to high, e.g. 100 Hz to 20 kHz.') },
  ),
];

export const NoiseRequestSchema = fields(NOISE_REQUEST_FIELDS, NOISE_REQUEST_RULES);
export type NoiseRequest = v.InferOutput<typeof NoiseRequestSchema>;


/** A noise run's request as the service stored it and sends it back: as it was taken, with the maximum stimulus it recorded. */
export const NoiseRequestAsRunSchema = fields({ ...NOISE_REQUEST_FIELDS, maxStimulusVpp: maxStimulusRecorded }, NOISE_REQUEST_RULES);

/** How the records are taken, fixed when the run is planned so a resumed run goes on exactly alike. Scope-only figures are 0 for a meter run. */
export const NoiseAcquisitionSchema = replyObject({
  measurement: oneOf(NOISE_MEASUREMENTS),
  /** Scope: samples per second asked of it, and per record; the record's duration. Meter: its aperture per reading. */
  sampleRateHz: quantity,
  recordPoints: count,
  recordS: quantity,
  segmentLength: count,
  window: oneOf(NOISE_WINDOWS),
  /** Welch overlap of segments in one record, a fraction of the segment. */
  overlap: quantity,
  /** The output's computed RMS noise up to the sample rate's Nyquist frequency (scope) or over the band (meter), volts: sets the scope's range. */
  expectedRmsV: quantity,
  /** The output's computed DC level with the input at rest, volts (offset and bias currents): the scope's range holds it too. */
  expectedDcV: quantity,
  /** Scope: the input range first asked for (largest input either side of 0 V), volts. */
  rangeV: quantity,
  /** Time the circuit is given after the generator is switched off, before the first record, bench seconds. */
  settleS: quantity,
  /** The generator's source resistance the stage input sees with the output off (profile), ohms: the computed density counts it. */
  sourceImpedanceOhm: quantity,
});
export type NoiseAcquisition = v.InferOutput<typeof NoiseAcquisitionSchema>;

export const NoisePlanSummarySchema = replyObject({
  ...SWEEP_PLAN_SUMMARY_FIELDS,
  acquisition: NoiseAcquisitionSchema,
});
export type NoisePlanSummary = v.InferOutput<typeof NoisePlanSummarySchema>;

/** The stored records of a noise run, columnar: index i of every array is one record. */
export const NoiseRecordColumnsSchema = replyObject({
  step: countColumn,
  /** Scope: the record's sample rate as the scope reported it, Hz; meter: NaN. */
  sampleRateHz: quantityColumn,
  /** Welch segments averaged in the record, and their equivalent degrees of freedom (scope; 0 for the meter). */
  segments: countColumn,
  degreesOfFreedom: quantityColumn,
  /** AC RMS of the record (scope: standard deviation of its samples; meter: its reading), volts. */
  rmsV: quantityColumn,
  /** The record's mean (scope), volts; NaN for the meter. */
  meanV: quantityColumn,
  /** PointFlag bits (overrange, retried). */
  flags: countColumn,
  measuredAt: textColumn,
});
export type NoiseRecordColumns = v.InferOutput<typeof NoiseRecordColumnsSchema>;

/** The measured density over the band beside the computed one, per bin (scope runs). */
export const NoiseDensityColumnsSchema = replyObject({
  frequencyHz: quantityColumn,
  /** Welch estimate, V/√Hz. */
  measuredVPerRtHz: quantityColumn,
  /** Standard uncertainty of the measured density (k = 1), V/√Hz: the estimate × 1/√(2ν). */
  uncertaintyVPerRtHz: quantityColumn,
  /** 95 % interval of the true density (χ² with ν degrees of freedom), V/√Hz. */
  low95VPerRtHz: quantityColumn,
  high95VPerRtHz: quantityColumn,
  /** The build's circuit with its input held by the generator's source resistance, V/√Hz (app/circuit solveNoise). */
  computedVPerRtHz: quantityColumn,
});
export type NoiseDensityColumns = v.InferOutput<typeof NoiseDensityColumnsSchema>;

export const NoiseRunDetailSchema = replyObject({
  ...RUN_SUMMARY_FIELDS,
  kind: v.literal('noise', (issue) => `must be "noise" (a noise run), got ${describeValue(issue.input)}`),
  /** When the bench could not reach the store, as for sweeps (RunDetail). */
  offlinePeriods: listOf(OfflinePeriodSchema),
  request: NoiseRequestAsRunSchema,
  acquisition: NoiseAcquisitionSchema,
  bench: listOf(InstrumentInfoSchema),
  softwareVersion: replyText,
  records: NoiseRecordColumnsSchema,
  density: NoiseDensityColumnsSchema,
  figures: RunFiguresSchema,
  events: listOf(RunEventSchema),
});
export type NoiseRunDetail = v.InferOutput<typeof NoiseRunDetailSchema>;
