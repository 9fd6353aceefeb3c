/** Copies caller data into a Float64Array, refusing NaN and ±Infinity by index. */
import { ValidationError } from '../errors';

export function finiteColumn(values: ArrayLike<number>, where: string): Float64Array {
  const out = Float64Array.from(values);
  out.forEach((v, i) => {
    if (!Number.isFinite(v)) throw new ValidationError(`${where}[${i}]`, `${v} is not a finite number`);
  });
  return out;
}
