/**
 * Mean of repeated readings after rejecting outliers by the modified z-score
 * M = 0.6745·(x − median)/MAD, rejecting |M| > 3.5 (B. Iglewicz and
 * D. C. Hoaglin, How to Detect and Handle Outliers, ASQC 1993; recalled from
 * memory). Median and MAD are not pulled by the outliers they are meant to find.
 */
import { ValidationError } from '../errors';
import { medianOfSorted } from '../numeric/percentile';

export const MODIFIED_Z_LIMIT = 3.5;
/** 0.6745 ≈ Φ⁻¹(0.75): makes MAD estimate σ for normal data. */
const MAD_TO_SIGMA = 0.6745;

export interface RobustAverage {
  mean: number;
  /** Standard deviation of the kept values over √(kept count); NaN with one kept value. */
  standardError: number;
  keptCount: number;
  /** Indices into the input of the values left out. */
  rejectedIndices: number[];
}

export function averageWithOutlierRejection(values: ArrayLike<number>, limit: number = MODIFIED_Z_LIMIT): RobustAverage {
  const count = values?.length ?? 0;
  if (count === 0) throw new ValidationError('values', 'is empty', 'Take at least one reading.');
  for (let i = 0; i < count; i++) if (!Number.isFinite(values[i])) throw new ValidationError(`values[${i}]`, `${values[i]} is not a finite reading`);
  const sorted = Float64Array.from(values).sort();
  const center = medianOfSorted(sorted);
  const deviations = Float64Array.from(values, (v) => Math.abs(v - center)).sort();
  const mad = medianOfSorted(deviations);
  const rejectedIndices: number[] = [];
  let sum = 0;
  let kept = 0;
  for (let i = 0; i < count; i++) {
    // With MAD = 0 (over half the readings identical) anything off the median is an outlier.
    const z = mad > 0 ? (MAD_TO_SIGMA * (values[i] - center)) / mad : values[i] === center ? 0 : Number.POSITIVE_INFINITY;
    if (Math.abs(z) > limit) rejectedIndices.push(i);
    else { sum += values[i]; kept++; }
  }
  const mean = sum / kept;
  let squares = 0;
  for (let i = 0, r = 0; i < count; i++) {
    if (rejectedIndices[r] === i) { r++; continue; }
    squares += (values[i] - mean) ** 2;
  }
  const standardError = kept > 1 ? Math.sqrt(squares / (kept - 1) / kept) : Number.NaN;
  return { mean, standardError, keptCount: kept, rejectedIndices };
}
