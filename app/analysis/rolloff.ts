/**
 * Roll-off slope in dB per decade from the measured points in the stop band.
 */
import { ascendingOrder } from '../numeric/ascending-order';

/**
 * Least-squares slope of gain against log10(f) over the points at least
 * `depthDb` below the pass band on the high-frequency side (or the low side
 * when there is none, as for a high-pass). A first-order stage gives ≈ −20
 * dB/decade (handbook: single-pole asymptote, 20 dB per decade).
 * Returns undefined with fewer than 3 such points.
 */
export function rolloffDbPerDecade(
  frequencyHz: ArrayLike<number>,
  gainDb: ArrayLike<number>,
  passbandDb: number,
  depthDb = 6,
): number | undefined {
  const order = ascendingOrder(frequencyHz);
  let peakAt = 0;
  for (let k = 1; k < order.length; k++) if (gainDb[order[k]] > gainDb[order[peakAt]]) peakAt = k;
  const high = order.slice(peakAt + 1).filter((i) => gainDb[i] <= passbandDb - depthDb);
  const low = order.slice(0, peakAt).filter((i) => gainDb[i] <= passbandDb - depthDb);
  const chosen = high.length >= 3 ? high : low.length >= 3 ? low : undefined;
  if (!chosen) return undefined;
  return slope(chosen.map((i) => Math.log10(frequencyHz[i])), chosen.map((i) => gainDb[i]));
}

function slope(xs: number[], ys: number[]): number {
  const n = xs.length;
  const meanX = xs.reduce((s, x) => s + x, 0) / n;
  const meanY = ys.reduce((s, y) => s + y, 0) / n;
  let sxy = 0;
  let sxx = 0;
  for (let i = 0; i < n; i++) {
    sxy += (xs[i] - meanX) * (ys[i] - meanY);
    sxx += (xs[i] - meanX) ** 2;
  }
  return sxy / sxx;
}
