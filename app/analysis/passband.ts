/**
 * Pass-band gain and the −3 dB corners relative to it.
 */
import { HALF_POWER_DB } from '../units';
import { median } from '../numeric/percentile';
import { ascendingOrder } from '../numeric/ascending-order';
import { crossingsLogF } from './crossing';

// The theory summary (app/circuit) uses the same level, so both read −3 dB alike.
export { HALF_POWER_DB };

/**
 * Pass-band gain, defined as the theory engine's summary defines it (app/circuit
 * summarizeAc) so measured and theoretical −3 dB points mean the same thing:
 * the low-frequency gain when it is within 3 dB of the peak (low-pass-like
 * responses, where a resonant peak must not become the reference), otherwise
 * the peak (high- and band-pass). Measured data is noisy, so "low-frequency
 * gain" is the median of the points in the lowest `lowEndDecades` of the sweep
 * (by frequency, not by count, so a coarse grid and a dense theory grid mean
 * the same thing) and "peak" the median of the points within `windowDb` of the
 * largest (common practice, no source).
 */
export function passbandGainDb(frequencyHz: ArrayLike<number>, gainDb: ArrayLike<number>, windowDb = 0.1, lowEndDecades = 0.1): number | undefined {
  const order = ascendingOrder(frequencyHz).filter((i) => Number.isFinite(gainDb[i]));
  if (order.length === 0) return undefined;
  let peak = -Infinity;
  for (const i of order) if (gainDb[i] > peak) peak = gainDb[i];
  const lowEndHz = frequencyHz[order[0]] * 10 ** lowEndDecades;
  const lowEnd = median(order.filter((i) => frequencyHz[i] <= lowEndHz).map((i) => gainDb[i]));
  if (lowEnd >= peak + HALF_POWER_DB) return lowEnd;
  return median(order.filter((i) => gainDb[i] >= peak - windowDb).map((i) => gainDb[i]));
}

/** Frequencies where the gain crosses pass band − 3.01 dB, interpolated in log f. */
export function minus3dbFrequenciesHz(frequencyHz: ArrayLike<number>, gainDb: ArrayLike<number>, passbandDb: number): number[] {
  return crossingsLogF(frequencyHz, gainDb, passbandDb + HALF_POWER_DB);
}
