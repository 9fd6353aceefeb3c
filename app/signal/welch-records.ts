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
import { chiSquaredInterval95, welchPsd, type WelchEstimate, type WelchOptions } from './welch';

export function welchPsdOfRecords(recordsV: ArrayLike<number>[], sampleRateHz: number, options: WelchOptions): WelchEstimate {
  if (recordsV.length === 0) throw new ValidationError('noise records', 'none were given', 'Record the output at least once.');
  const estimates = recordsV.map((record) => welchPsd(record, sampleRateHz, options));
  const first = estimates[0];
  const bins = first.frequencyHz.length;
  const psd = new Float64Array(bins);
  let segments = 0;
  let nu = 0;
  for (const estimate of estimates) {
    segments += estimate.segments;
    nu += estimate.degreesOfFreedom;
    for (let b = 0; b < bins; b++) psd[b] += estimate.psdV2PerHz[b] * estimate.segments;
  }
  for (let b = 0; b < bins; b++) psd[b] /= segments;
  return {
    ...first,
    psdV2PerHz: psd,
    densityVPerRtHz: psd.map(Math.sqrt),
    segments,
    degreesOfFreedom: nu,
    psdRelativeStdError: Math.sqrt(2 / nu),
    densityRelativeStdError: 1 / Math.sqrt(2 * nu),
    psdInterval95: chiSquaredInterval95(nu),
  };
}
