/**
 * RMS noise in a band: √∫ e(f)² df over a density column, and the noise of a
 * design integrated on its own dense log grid.
 */
import { ValidationError } from '../errors';
import { logGrid } from '../units';
import { solveNoise, type NoiseOptions } from './solve-noise';
import type { Design } from './types';

/**
 * Trapezoidal integral of density² over the columns' whole span, then the
 * root: volts RMS for a V/√Hz density. On a log grid of 200 points per decade
 * the rule's error for a 1/f or f² shape is below 1e-5 relative.
 */
export function rmsFromDensity(frequencyHz: ArrayLike<number>, densityPerRtHz: ArrayLike<number>): number {
  let sum = 0;
  for (let i = 1; i < frequencyHz.length; i++) {
    const a = densityPerRtHz[i - 1];
    const b = densityPerRtHz[i];
    sum += 0.5 * (a * a + b * b) * (frequencyHz[i] - frequencyHz[i - 1]);
  }
  return Math.sqrt(sum);
}

export interface BandNoise {
  fromHz: number;
  toHz: number;
  /** RMS of the total output noise over the band, volts. */
  outputRmsV: number;
  /** Per source (in `sourceNames` order), its RMS output noise over the band, volts. */
  sourceRmsV: number[];
  sourceNames: string[];
}

/** Points per decade of the integration grid (see rmsFromDensity). */
export const BAND_NOISE_POINTS_PER_DECADE = 200;

export function bandNoise(design: Design, fromHz: number, toHz: number, options: NoiseOptions = {}): BandNoise {
  if (!(fromHz > 0) || !(toHz > fromHz)) {
    throw new ValidationError('noise band', `${fromHz} Hz to ${toHz} Hz is not a band`, 'Give a start above 0 Hz and an end above the start, e.g. 10:100k.');
  }
  const noise = solveNoise(design, logGrid(fromHz, toHz, BAND_NOISE_POINTS_PER_DECADE), options);
  return {
    fromHz,
    toHz,
    outputRmsV: rmsFromDensity(noise.frequencyHz, noise.outputVPerRtHz),
    sourceRmsV: noise.contributionsVPerRtHz.map((column) => rmsFromDensity(noise.frequencyHz, column)),
    sourceNames: noise.sources.map((s) => s.name),
  };
}
