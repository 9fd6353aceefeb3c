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
