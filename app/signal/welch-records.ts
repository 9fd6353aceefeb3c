/**
 * Welch's estimate over several separate records (a scope's successive
 * acquisitions, not contiguous in time): each record is estimated with
 * welchPsd on the same segment length, and the periodograms are averaged
 * weighted by their segment counts. Records far apart are independent, so
 * their equivalent degrees of freedom add (a sum of independent χ² variables,
 * Percival & Walden 1993, §6.17, recalled from memory); the relative errors
 * and the 95 % interval follow from the total ν as in welch.ts.
 */
import { ValidationError } from '../errors';
import { welchEstimateOf, welchPsd, type WelchAxis, type WelchEstimate, type WelchOptions } from './welch';

export function welchPsdOfRecords(recordsV: ArrayLike<number>[], sampleRateHz: number, options: WelchOptions): WelchEstimate {
  if (recordsV.length === 0) throw new ValidationError('noise records', 'none were given', 'Record the output at least once.');
  const estimates = recordsV.map((record) => welchPsd(record, sampleRateHz, options));
  return combineWelchEstimates(estimates, { sampleRateHz, segmentLength: options.segmentLength, window: options.window ?? 'hann' });
}

/** The part of a record's estimate that combining needs (what a noise run stores per record). */
export interface WelchPart {
  psdV2PerHz: ArrayLike<number>;
  segments: number;
  degreesOfFreedom: number;
}

/** One estimate from several records' estimates on one axis: periodograms averaged by segment count, ν added. */
export function combineWelchEstimates(parts: readonly WelchPart[], axis: WelchAxis): WelchEstimate {
  if (parts.length === 0) throw new ValidationError('noise records', 'none were given', 'Record the output at least once.');
  const bins = axis.segmentLength / 2 + 1;
  const psd = new Float64Array(bins);
  let segments = 0;
  let nu = 0;
  parts.forEach((part, index) => {
    if (part.psdV2PerHz.length !== bins) throw new ValidationError(`noise record ${index}`, `has ${part.psdV2PerHz.length} bins where ${bins} were expected`, 'Combine only records estimated with one segment length.');
    segments += part.segments;
    nu += part.degreesOfFreedom;
    for (let b = 0; b < bins; b++) psd[b] += part.psdV2PerHz[b] * part.segments;
  });
  for (let b = 0; b < bins; b++) psd[b] /= segments;
  return welchEstimateOf(psd, segments, nu, axis);
}
