/**
 * Tolerance band of an AC response by Monte Carlo: every part with a
 * tolerance is drawn independently per sample, the circuit is re-stamped and
 * solved at every frequency, and per-frequency percentiles of gain and phase
 * form the band. Reproducible for a seed (see random.ts).
 *
 * Distributions: 'uniform' draws value·(1 + t·u), u uniform in [−1, 1);
 * 'gaussian' draws σ = t/3 truncated to ±t (the tolerance read as a 3σ
 * limit with out-of-tolerance parts rejected; common practice, no source).
 */
import { ValidationError } from '../errors';
import { dbFromRatio } from '../units';
import { AcSolver } from './ac-solver';
import { continuousPhaseDeg } from './phase';
import { percentileOfSorted } from '../numeric/percentile';
import { SeededRandom } from '../numeric/random';
import { nominalValues } from './stamp';
import type { Design } from './types';

export type ToleranceDistribution = 'uniform' | 'gaussian';

export interface MonteCarloOptions {
  samples: number;
  seed: number;
  lowPercentile?: number;
  highPercentile?: number;
  distribution?: ToleranceDistribution;
  /** Solve with ideal op-amps (tolerance band of the ideal response). */
  idealOpAmps?: boolean;
}

/**
 * The tolerance band every surface draws (Design view, Sweep view, records):
 * one sample count and one fixed seed, so the band a user sees while designing
 * is the band the run's record shows. 300 samples keep the 2.5/97.5 %
 * percentiles stable and fast enough to redraw while typing (common practice,
 * no source).
 */
export const TOLERANCE_BAND_SETTINGS = { samples: 300, seed: 20_251_201 } as const;

export interface MonteCarloBand {
  gainLowDb: Float64Array;
  gainHighDb: Float64Array;
  phaseLowDeg: Float64Array;
  phaseHighDeg: Float64Array;
}

export function monteCarloAc(design: Design, frequenciesHz: Float64Array, options: MonteCarloOptions): MonteCarloBand {
  const { samples, seed } = options;
  const lowPercentile = options.lowPercentile ?? 2.5;
  const highPercentile = options.highPercentile ?? 97.5;
  const distribution = options.distribution ?? 'uniform';
  if (!(Number.isInteger(samples) && samples >= 2)) throw new ValidationError('samples', `${samples} is not a usable sample count`, 'Use a whole number of at least 2 (1000 is typical).');
  if (!Number.isFinite(seed)) throw new ValidationError('seed', `${seed} is not a number`);
  if (!(lowPercentile >= 0 && highPercentile <= 100 && lowPercentile < highPercentile)) {
    throw new ValidationError('percentiles', `${lowPercentile}–${highPercentile} is not a percentile range`, 'Use e.g. 2.5 and 97.5.');
  }

  const count = frequenciesHz.length;
  const solver = new AcSolver(design);
  const mode = options.idealOpAmps ? 'ideal' : 'model';
  const nominal = nominalValues(design);
  const tolerances = design.parts.map((p) => ('tolerance' in p && p.tolerance ? p.tolerance : 0));
  const values = new Float64Array(nominal.length);
  const random = new SeededRandom(seed);

  // Columnar storage: row = frequency, column = sample, so each percentile sorts a contiguous slice.
  const gainBySample = new Float64Array(count * samples);
  const phaseBySample = new Float64Array(count * samples);
  const re = new Float64Array(count);
  const im = new Float64Array(count);
  const phase = new Float64Array(count);
  const h = new Float64Array(2);

  solver.stamp(mode, nominal);
  for (let i = 0; i < count; i++) {
    solver.transferAt(frequenciesHz[i], h);
    re[i] = h[0];
    im[i] = h[1];
  }
  const nominalStartPhaseDeg = count > 0 ? continuousPhaseDeg(re, im, phase)[0] : 0;

  for (let sample = 0; sample < samples; sample++) {
    for (let p = 0; p < nominal.length; p++) {
      const t = tolerances[p];
      values[p] = t === 0 ? nominal[p] : nominal[p] * (1 + t * deviate(random, distribution));
    }
    solver.stamp(mode, values);
    for (let i = 0; i < count; i++) {
      solver.transferAt(frequenciesHz[i], h);
      re[i] = h[0];
      im[i] = h[1];
    }
    continuousPhaseDeg(re, im, phase);
    // Keep every sample on the nominal curve's branch of the phase.
    const shift = count > 0 ? 360 * Math.round((nominalStartPhaseDeg - phase[0]) / 360) : 0;
    for (let i = 0; i < count; i++) {
      gainBySample[i * samples + sample] = dbFromRatio(Math.hypot(re[i], im[i]));
      phaseBySample[i * samples + sample] = phase[i] + shift;
    }
  }

  const band: MonteCarloBand = {
    gainLowDb: new Float64Array(count),
    gainHighDb: new Float64Array(count),
    phaseLowDeg: new Float64Array(count),
    phaseHighDeg: new Float64Array(count),
  };
  for (let i = 0; i < count; i++) {
    const gains = gainBySample.subarray(i * samples, (i + 1) * samples).sort();
    band.gainLowDb[i] = percentileOfSorted(gains, lowPercentile);
    band.gainHighDb[i] = percentileOfSorted(gains, highPercentile);
    const phases = phaseBySample.subarray(i * samples, (i + 1) * samples).sort();
    band.phaseLowDeg[i] = percentileOfSorted(phases, lowPercentile);
    band.phaseHighDeg[i] = percentileOfSorted(phases, highPercentile);
  }
  return band;
}

/** One relative deviation in [−1, 1] (scaled by the tolerance by the caller). */
function deviate(random: SeededRandom, distribution: ToleranceDistribution): number {
  if (distribution === 'uniform') return 2 * random.nextUniform() - 1;
  for (;;) {
    const d = random.nextGaussian() / 3;
    if (d >= -1 && d <= 1) return d;
  }
}
