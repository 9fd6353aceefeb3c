/**
 * Order statistics of sorted data, shared by the tolerance bands (circuit),
 * robust averaging (signal) and the pass-band level (analysis).
 */

/**
 * Percentile of sorted data with linear interpolation between order
 * statistics (the "type 7" definition of Hyndman & Fan, 1996).
 */
export function percentileOfSorted(sorted: Float64Array, percent: number): number {
  const count = sorted.length;
  if (count === 0) return NaN;
  const position = (percent / 100) * (count - 1);
  const below = Math.floor(position);
  const above = Math.min(count - 1, below + 1);
  return sorted[below] + (position - below) * (sorted[above] - sorted[below]);
}

/**
 * Median of sorted data: the middle value, or the mean of the two middle
 * values. Equals percentileOfSorted(sorted, 50) up to rounding; kept as the
 * plain midpoint so the result is the exact average its callers document.
 */
export function medianOfSorted(sorted: ArrayLike<number>): number {
  const middle = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[middle] : 0.5 * (sorted[middle - 1] + sorted[middle]);
}

/** Median of data in any order. */
export function median(values: Iterable<number>): number {
  return medianOfSorted(Float64Array.from(values).sort());
}

/** Percentile (type 7, as percentileOfSorted) of data in any order. */
export function percentile(values: Iterable<number>, percent: number): number {
  return percentileOfSorted(Float64Array.from(values).sort(), percent);
}
