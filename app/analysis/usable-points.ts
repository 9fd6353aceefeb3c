import { PointFlag } from '../contract/contract';

/** Indexes of the points whose `values` can enter a fit: finite, and not flagged overrange or not-a-number. */
export function usablePointIndexes(flags: ArrayLike<number>, values: ArrayLike<number>): number[] {
  const usable: number[] = [];
  for (let i = 0; i < values.length; i++) {
    if (Number.isFinite(values[i]) && (flags[i] & (PointFlag.overrange | PointFlag.notANumber)) === 0) usable.push(i);
  }
  return usable;
}
