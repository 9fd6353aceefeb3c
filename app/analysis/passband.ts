/**
 * Pass-band gain and the −3 dB corners relative to it.
 */
import { dbFromRatio } from '../units';
import { crossingsLogF } from './crossing';

/** 20·log10(1/√2) ≈ −3.0103 dB: the half-power level. */
export const HALF_POWER_DB = dbFromRatio(Math.SQRT1_2);

/**
 * Pass-band gain: median of the gains within `windowDb` of the largest one.
 * The median of a window (not the maximum) keeps one noisy high point from
 * biasing the reference (common practice, no source).
 */
export function passbandGainDb(gainDb: ArrayLike<number>, windowDb = 0.1): number | undefined {
  let peak = -Infinity;
  for (let i = 0; i < gainDb.length; i++) if (Number.isFinite(gainDb[i]) && gainDb[i] > peak) peak = gainDb[i];
  if (!Number.isFinite(peak)) return undefined;
  const near: number[] = [];
  for (let i = 0; i < gainDb.length; i++) if (gainDb[i] >= peak - windowDb) near.push(gainDb[i]);
  near.sort((a, b) => a - b);
  const middle = near.length >> 1;
  return near.length % 2 === 1 ? near[middle] : (near[middle - 1] + near[middle]) / 2;
}

/** Frequencies where the gain crosses pass band − 3.01 dB, interpolated in log f. */
export function minus3dbFrequenciesHz(frequencyHz: ArrayLike<number>, gainDb: ArrayLike<number>, passbandDb: number): number[] {
  return crossingsLogF(frequencyHz, gainDb, passbandDb + HALF_POWER_DB);
}
