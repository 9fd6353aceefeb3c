/**
 * The figures the service works out from a run's points or records, and its
 * verdict: a sweep's (RunFigures) and a noise run's (NoiseFigures, part of
 * them). Schemas first (reply-fields.ts), types inferred. Every figure is a
 * computed number, so it may be NaN, which JSON carries as null (quantity).
 */
import * as v from 'valibot';
import { trueOrFalse } from './field-schemas';
import { absentOr, count, listOf, quantity, quantityColumn, replyObject, replyText } from './reply-fields';

/** The figures of a noise run: measured against computed over the band. */
export const NoiseFiguresSchema = replyObject({
  fromHz: quantity,
  toHz: quantity,
  /** Records the figures rest on (records flagged overrange or not-a-number are left out). */
  recordsUsed: count,
  /** RMS over the band, volts: from the density (scope) or the readings (meter); its standard uncertainty from the spread over records. */
  measuredRmsV: quantity,
  measuredRmsUncertaintyV: absentOr(quantity),
  computedRmsV: quantity,
  /** Scope runs: what the estimate rests on. */
  segments: absentOr(count),
  degreesOfFreedom: absentOr(quantity),
  /** Relative standard uncertainty of each bin's density, 1/√(2ν). */
  densityRelativeUncertainty: absentOr(quantity),
  enbwHz: absentOr(quantity),
  resolutionHz: absentOr(quantity),
  /** Bins in the band, and the share of them whose 95 % interval holds the computed density (about 0.95 when they agree). */
  bins: absentOr(count),
  shareWithin95: absentOr(quantity),
  /** Mean of 20·log10(measured/computed) over the band's bins, dB. */
  meanDeviationDb: absentOr(quantity),
});
export type NoiseFigures = v.InferOutput<typeof NoiseFiguresSchema>;

/** A fitted value's 95 % interval: [low, high]. */
const interval = v.tuple([quantity, quantity], 'must be a [low, high] interval');

const RUN_FIGURE_FIELDS = {
  passbandGainDb: absentOr(quantity),
  minus3dbHz: quantityColumn,
  rolloffDbPerDecade: absentOr(quantity),
  gainLimitHz: absentOr(quantity),
  gbwEstimateHz: absentOr(quantity),
  gbwUncertaintyHz: absentOr(quantity),
  maxDeviationDb: absentOr(quantity),
  /** AC runs: peak of measured over ideal-op-amp gain above its low-frequency value, dB. */
  closedLoopPeakingDb: absentOr(quantity),
  /** Phase margin of the second-order loop with that peaking (an estimate), degrees. */
  phaseMarginEstimateDeg: absentOr(quantity),
  /** No peaking measured: the margin is at least phaseMarginEstimateDeg. */
  phaseMarginEstimateIsLowerBound: absentOr(trueOrFalse),
  /** Computed for the build's circuit (loop gain of the output op-amp): phase margin, degrees, and closed-loop peaking, dB. */
  theoryPhaseMarginDeg: absentOr(quantity),
  theoryPeakingDb: absentOr(quantity),
  /** Plain warnings of the computed theory for the build's circuit (e.g. a phase margin below 45°). */
  theoryWarnings: absentOr(listOf(replyText)),
  /** Noise runs: measured against computed over the band. */
  noise: absentOr(NoiseFiguresSchema),
  /** DC runs: fitted log-stage parameters with 95 % intervals. */
  logFit: absentOr(replyObject({ n: quantity, nCi: interval, isA: quantity, isCi: interval, rsOhm: quantity, rsCi: interval })),
};

export const RunFiguresSchema = replyObject(RUN_FIGURE_FIELDS);
export type RunFigures = v.InferOutput<typeof RunFiguresSchema>;

/** The name of every figure, in the order RunFigures lists them. */
export const RUN_FIGURE_NAMES = Object.keys(RUN_FIGURE_FIELDS) as (keyof RunFigures)[];

export const VerdictSchema = replyObject({
  pass: trueOrFalse,
  reasons: listOf(replyText),
});
export type Verdict = v.InferOutput<typeof VerdictSchema>;
