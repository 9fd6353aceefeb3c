/**
 * General numerical helpers shared by the pure engines (circuit, signal,
 * analysis), the simulated bench and the tests: seeded random numbers,
 * percentiles, dense linear solves, the order of points along x. Pure: no
 * imports at all.
 */
export { SeededRandom } from './random';
export { median, medianOfSorted, percentile, percentileOfSorted } from './percentile';
export { solveComplexInPlace, solveRealInPlace } from './dense-solve';
export { ascendingOrder, curveSortedByX, sortedAscending } from './ascending-order';
