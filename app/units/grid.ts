/** Frequency and level grids, shared by theory, plans and the views. */
import { ValidationError } from '../errors';

/** Log-spaced points from `from` to `to` inclusive, `perDecade` points per decade. */
export function logGrid(from: number, to: number, perDecade: number): Float64Array {
  if (!(from > 0) || !(to > 0)) throw new ValidationError('grid', 'log grid limits must be positive');
  if (!(to >= from)) throw new ValidationError('grid', `end (${to}) is below start (${from})`);
  if (!(perDecade >= 1)) throw new ValidationError('grid', 'points per decade must be at least 1');
  const decades = Math.log10(to / from);
  // At least two points, so a grid always spans from..to (equal limits give two equal points).
  const count = Math.max(1, Math.round(decades * perDecade)) + 1;
  const grid = new Float64Array(count);
  for (let i = 0; i < count; i++) grid[i] = from * 10 ** ((decades * i) / (count - 1));
  grid[count - 1] = to; // exact end, free of rounding in the power
  return grid;
}

/** Linearly spaced points from `from` to `to` inclusive. */
export function linearGrid(from: number, to: number, count: number): Float64Array {
  if (!(count >= 2)) throw new ValidationError('grid', 'a linear grid needs at least 2 points');
  const grid = new Float64Array(count);
  for (let i = 0; i < count; i++) grid[i] = from + ((to - from) * i) / (count - 1);
  return grid;
}
