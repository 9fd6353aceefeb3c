/**
 * The one ordering of points along x (app/numeric/ascending-order.ts) that
 * analysis, comparisons, record plots and the window's plots share. Expected
 * orders are worked by hand — common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { ascendingOrder, curveSortedByX, sortedAscending } from '../../../app/numeric';

describe('ascendingOrder', () => {
  it('visits values in increasing order, equal ones in stored order, missing and non-finite ones last', () => {
    expect(ascendingOrder([100, 10, 1000, 50])).toEqual([1, 3, 0, 2]);
    expect(ascendingOrder([5, 1, 5, 1])).toEqual([1, 3, 0, 2]);
    expect(ascendingOrder([3, null, Number.NaN, 1, Number.POSITIVE_INFINITY, 2])).toEqual([3, 5, 0, 1, 2, 4]);
    expect(ascendingOrder([])).toEqual([]);
  });

  it('reorders a curve by x and keeps each y with its x', () => {
    expect(curveSortedByX({ xs: [10, 1000, 100, 300], ys: [0, -20, -3, null] })).toEqual({ xs: [10, 100, 300, 1000], ys: [0, -3, null, -20] });
  });
});

describe('sortedAscending', () => {
  it('sorts numerically (not as text), NaN last', () => {
    expect(sortedAscending([100, 9, 1000, 20])).toEqual([9, 20, 100, 1000]);
    expect(sortedAscending(new Set([3, Number.NaN, -1]))).toEqual([-1, 3, Number.NaN]);
  });
});
