import { PointFlag } from '../contract/contract';

/** Whether point i's value can enter a fit or a figure: finite, and not flagged overrange or not-a-number. */
export function isUsablePoint(flags: ArrayLike<number>, values: ArrayLike<number>, i: number): boolean {
  return (flags[i] & (PointFlag.overrange | PointFlag.notANumber)) === 0 && Number.isFinite(values[i]);
}

/** Indexes of the usable points (see isUsablePoint). */
export function usablePointIndexes(flags: ArrayLike<number>, values: ArrayLike<number>): number[] {
  const usable: number[] = [];
  for (let i = 0; i < values.length; i++) if (isUsablePoint(flags, values, i)) usable.push(i);
  return usable;
}
