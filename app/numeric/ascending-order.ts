/**
 * Points in increasing x. A sweep stores its refinement points after the
 * planned grid, so stored order is not frequency order: whatever interpolates
 * along a curve or draws it as a line takes its order from here (analysis,
 * comparisons, record plots, the window's plots).
 */

/** Indexes that visit `values` in increasing order; equal values keep their stored order (a stable sort), missing or non-finite ones come last. */
export function ascendingOrder(values: ArrayLike<number | null>): number[] {
  const order = Array.from({ length: values.length }, (_, i) => i);
  const key = (i: number) => {
    const value = values[i];
    return value === null || !Number.isFinite(value) ? Number.POSITIVE_INFINITY : value;
  };
  return order.sort((a, b) => key(a) - key(b) || a - b);
}

/** A curve's columns reordered by x, so a line through them runs left to right. */
export function curveSortedByX<Y>(curve: { xs: ArrayLike<number | null>; ys: ArrayLike<Y> }): { xs: Array<number | null>; ys: Y[] } {
  const order = ascendingOrder(curve.xs);
  return { xs: order.map((i) => curve.xs[i]), ys: order.map((i) => curve.ys[i]) };
}

/** Values in increasing order, NaN last: a typed-array sort, fast enough for the tens of thousands of frequencies a window plot sorts per draw. */
export function sortedAscending(values: Iterable<number>): number[] {
  return Array.from(Float64Array.from(values).sort());
}
