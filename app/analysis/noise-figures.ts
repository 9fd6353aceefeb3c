/**
 * A noise run's result from its stored records: the records' Welch estimates
 * combined into one density (periodograms averaged by segment count, degrees
 * of freedom added: app/signal/welch-records.ts), on the bins inside the band,
 * beside the computed density at the same frequencies; or, for meter
 * readings, their RMS beside the computed RMS over the band.
 *
 * - Each bin's standard uncertainty is the density × 1/√(2ν) and its 95 %
 *   interval the χ² one (app/signal/welch.ts); shareWithin95 is the share of
 *   bins whose interval holds the computed density — about 0.95 when the
 *   circuit is as computed (bins are nearly independent; adjacent Hann bins
 *   are somewhat correlated, so the share scatters a little more than a
 *   binomial one would).
 * - The RMS over the band is √(Σ PSD_k·Δf) over the band's bins (Δf = fs/N:
 *   a density scaled by the window's ENBW sums to the power in the band,
 *   Heinzel, Rüdiger, Schilling 2002, §9), the computed one by the same sum
 *   over the same bins. Its uncertainty is the spread of the records' own
 *   band powers (Type A, GUM JCGM 100:2008 §4.2: s/√K), carried to the RMS
 *   by the first-order rule u(√P) = u(P)/(2√P) (GUM §5.1.3).
 * - Records flagged overrange or not-a-number are left out and counted.
 */
import { ValidationError } from '../errors';
import { PointFlag, type NoiseAcquisition, type NoiseDensityColumns, type NoiseFigures, type NoiseRequest } from '../contract/contract';
import { combineWelchEstimates, type WelchPart } from '../signal';

/** One stored record as the analysis reads it (StoredNoiseRecords, one index). */
export interface NoiseRecordInput {
  sampleRateHz: number;
  segments: number;
  degreesOfFreedom: number;
  psdV2PerHz: ArrayLike<number> | null;
  rmsV: number;
  flags: number;
}

export interface NoiseRunResult {
  density: NoiseDensityColumns;
  figures: NoiseFigures | undefined;
  /** Records left out (overrange, not a number). */
  recordsLeftOut: number;
}

export interface NoiseTheory {
  /** Computed output density at each frequency, V/√Hz. */
  densityAt(frequenciesHz: Float64Array): ArrayLike<number>;
  /** Computed RMS output noise over a band, volts (meter runs). */
  rmsOver(fromHz: number, toHz: number): number;
}

const UNUSABLE = PointFlag.overrange | PointFlag.notANumber;
/** Records whose sample rates differ by more than this cannot share one frequency axis. */
const SAME_RATE = 1e-9;

export function noiseRunResult(request: Pick<NoiseRequest, 'fromHz' | 'toHz'>, acquisition: NoiseAcquisition, records: readonly NoiseRecordInput[], theory: NoiseTheory): NoiseRunResult {
  const usable = records.filter((r) => (r.flags & UNUSABLE) === 0 && Number.isFinite(r.rmsV));
  const recordsLeftOut = records.length - usable.length;
  const empty: NoiseDensityColumns = { frequencyHz: [], measuredVPerRtHz: [], uncertaintyVPerRtHz: [], low95VPerRtHz: [], high95VPerRtHz: [], computedVPerRtHz: [] };
  if (usable.length === 0) return { density: empty, figures: undefined, recordsLeftOut };
  if (acquisition.measurement === 'meter') return { density: empty, figures: meterFigures(request, usable, theory), recordsLeftOut };
  return { ...scopeResult(request, acquisition, usable, theory), recordsLeftOut };
}

function meterFigures(request: Pick<NoiseRequest, 'fromHz' | 'toHz'>, records: readonly NoiseRecordInput[], theory: NoiseTheory): NoiseFigures {
  const powers = records.map((r) => r.rmsV * r.rmsV);
  const { mean, standardError } = meanAndStandardError(powers);
  const measuredRmsV = Math.sqrt(mean);
  return {
    fromHz: request.fromHz,
    toHz: request.toHz,
    recordsUsed: records.length,
    measuredRmsV,
    ...(standardError === undefined ? {} : { measuredRmsUncertaintyV: standardError / (2 * measuredRmsV) }),
    computedRmsV: theory.rmsOver(request.fromHz, request.toHz),
  };
}

function scopeResult(request: Pick<NoiseRequest, 'fromHz' | 'toHz'>, acquisition: NoiseAcquisition, records: readonly NoiseRecordInput[], theory: NoiseTheory): Omit<NoiseRunResult, 'recordsLeftOut'> {
  const sampleRateHz = records[0].sampleRateHz;
  records.forEach((record, index) => {
    if (!(Math.abs(record.sampleRateHz / sampleRateHz - 1) <= SAME_RATE)) {
      throw new ValidationError(`noise record ${index}`, `was taken at ${record.sampleRateHz} Hz, the first at ${sampleRateHz} Hz: records of two sample rates cannot be averaged`, 'Keep the scope\'s time base as the run set it; start a new run after changing it.');
    }
    if (!record.psdV2PerHz) throw new ValidationError(`noise record ${index}`, 'has no spectrum stored', 'A scope noise run stores each record\'s spectrum; this record was not made by one.');
  });
  const axis = { sampleRateHz, segmentLength: acquisition.segmentLength, window: acquisition.window };
  const parts: WelchPart[] = records.map((r) => ({ psdV2PerHz: r.psdV2PerHz!, segments: r.segments, degreesOfFreedom: r.degreesOfFreedom }));
  const estimate = combineWelchEstimates(parts, axis);
  // The band's bins, never DC or Nyquist (they have half the degrees of freedom).
  const bins: number[] = [];
  for (let k = 1; k < acquisition.segmentLength / 2; k++) {
    const f = estimate.frequencyHz[k];
    if (f >= request.fromHz && f <= request.toHz) bins.push(k);
  }
  const frequencyHz = Float64Array.from(bins, (k) => estimate.frequencyHz[k]);
  const computed = theory.densityAt(frequencyHz);
  const [lowFactor, highFactor] = estimate.psdInterval95.map(Math.sqrt);
  const density: NoiseDensityColumns = {
    frequencyHz: Array.from(frequencyHz),
    measuredVPerRtHz: bins.map((k) => estimate.densityVPerRtHz[k]),
    uncertaintyVPerRtHz: bins.map((k) => estimate.densityVPerRtHz[k] * estimate.densityRelativeStdError),
    low95VPerRtHz: bins.map((k) => estimate.densityVPerRtHz[k] * lowFactor),
    high95VPerRtHz: bins.map((k) => estimate.densityVPerRtHz[k] * highFactor),
    computedVPerRtHz: Array.from(computed),
  };
  const binWidthHz = estimate.resolutionHz;
  const bandPower = (psd: ArrayLike<number>) => bins.reduce((sum, k) => sum + psd[k] * binWidthHz, 0);
  const measuredPower = bandPower(estimate.psdV2PerHz);
  const computedPower = density.computedVPerRtHz.reduce((sum, d) => sum + d * d * binWidthHz, 0);
  // Each record's own band power, from its own Welch estimate as stored.
  const recordPowers = records.map((r) => bandPower(r.psdV2PerHz!));
  const { standardError } = meanAndStandardError(recordPowers);
  const measuredRmsV = Math.sqrt(measuredPower);
  const within = density.computedVPerRtHz.filter((c, i) => c >= density.low95VPerRtHz[i] && c <= density.high95VPerRtHz[i]).length;
  const deviationsDb = density.computedVPerRtHz.map((c, i) => 20 * Math.log10(density.measuredVPerRtHz[i] / c));
  const figures: NoiseFigures = {
    fromHz: request.fromHz,
    toHz: request.toHz,
    recordsUsed: records.length,
    measuredRmsV,
    ...(standardError === undefined || measuredRmsV === 0 ? {} : { measuredRmsUncertaintyV: standardError / (2 * measuredRmsV) }),
    computedRmsV: Math.sqrt(computedPower),
    segments: estimate.segments,
    degreesOfFreedom: estimate.degreesOfFreedom,
    densityRelativeUncertainty: estimate.densityRelativeStdError,
    enbwHz: estimate.enbwHz,
    resolutionHz: estimate.resolutionHz,
    bins: bins.length,
    ...(bins.length > 0
      ? { shareWithin95: within / bins.length, meanDeviationDb: deviationsDb.reduce((a, b) => a + b, 0) / deviationsDb.length }
      : {}),
  };
  return { density, figures };
}

/** Mean, and its standard error s/√K (undefined for a single value). */
function meanAndStandardError(values: readonly number[]): { mean: number; standardError: number | undefined } {
  const count = values.length;
  const mean = values.reduce((a, b) => a + b, 0) / count;
  if (count < 2) return { mean, standardError: undefined };
  const variance = values.reduce((sum, v) => sum + (v - mean) ** 2, 0) / (count - 1);
  return { mean, standardError: Math.sqrt(variance / count) };
}
