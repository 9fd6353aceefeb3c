/**
 * Level crossings of a sampled curve, interpolated linearly in log10(f).
 * Bode magnitudes are close to straight lines in (log f, dB), so linear
 * interpolation there is the natural choice (common practice, no source).
 */
import { ascendingOrder } from '../numeric/ascending-order';

export type CrossingDirection = 'falling' | 'rising' | 'either';

/** Frequencies (Hz) where `valuesDb` crosses `levelDb`, in increasing frequency order. */
export function crossingsLogF(
  frequencyHz: ArrayLike<number>,
  valuesDb: ArrayLike<number>,
  levelDb: number,
  direction: CrossingDirection = 'either',
): number[] {
  const found: number[] = [];
  const order = ascendingOrder(frequencyHz);
  for (let k = 1; k < order.length; k++) {
    const i0 = order[k - 1];
    const i1 = order[k];
    const below0 = valuesDb[i0] - levelDb;
    const below1 = valuesDb[i1] - levelDb;
    if (!Number.isFinite(below0) || !Number.isFinite(below1)) continue;
    const falling = below0 > 0 && below1 <= 0;
    const rising = below0 < 0 && below1 >= 0;
    if ((direction === 'falling' && !falling) || (direction === 'rising' && !rising)) continue;
    if (!falling && !rising) continue;
    found.push(interpolateLogF(frequencyHz[i0], below0, frequencyHz[i1], below1));
  }
  return found;
}

/** The frequency between f0 and f1 where a line through (log f0, y0), (log f1, y1) reaches 0. */
export function interpolateLogF(f0: number, y0: number, f1: number, y1: number): number {
  if (y0 === y1) return Math.sqrt(f0 * f1);
  const t = y0 / (y0 - y1);
  return 10 ** (Math.log10(f0) + t * (Math.log10(f1) - Math.log10(f0)));
}
