/**
 * Welch's estimate over separate records. Expected values: white Gaussian noise
 * of standard deviation σ sampled at fs has the one-sided density 2σ²/fs
 * (Heinzel, Rüdiger, Schilling 2002, §9: the variance spread over 0…fs/2); the
 * spread of the per-bin estimates matches the stated relative standard error
 * √(2/ν) with ν the sum of the records' degrees of freedom (independent χ²
 * variables add; Percival & Walden 1993).
 */
import { describe, expect, it } from 'vitest';
import { combineWelchEstimates, welchPsd, welchPsdOfRecords } from '../../../app/signal';
import { SeededRandom } from '../../../app/numeric';

const whiteRecord = (random: SeededRandom, count: number, sigmaV: number) => Float64Array.from({ length: count }, () => sigmaV * random.nextGaussian());

describe('welchPsdOfRecords', () => {
  it('white noise: level 2σ²/fs, and the bins spread as the stated √(2/ν)', () => {
    const random = new SeededRandom(11);
    const fs = 1e4;
    const sigma = 1e-3;
    const records = Array.from({ length: 5 }, () => whiteRecord(random, 4096, sigma));
    const estimate = welchPsdOfRecords(records, fs, { segmentLength: 256 });
    const single = welchPsd(records[0], fs, { segmentLength: 256 });
    expect(estimate.segments).toBe(5 * single.segments);
    expect(estimate.degreesOfFreedom).toBeCloseTo(5 * single.degreesOfFreedom, 9);
    const expected = (2 * sigma * sigma) / fs;
    const ratios = Array.from(estimate.psdV2PerHz.subarray(1, -1), (p) => p / expected);
    const mean = ratios.reduce((a, b) => a + b, 0) / ratios.length;
    const spread = Math.sqrt(ratios.reduce((a, r) => a + (r - mean) ** 2, 0) / (ratios.length - 1));
    // 127 bins: the mean is known to √(2/ν)/√127 (bins of a Hann-windowed estimate are correlated, so allow 4× that).
    expect(Math.abs(mean - 1)).toBeLessThan((4 * estimate.psdRelativeStdError) / Math.sqrt(ratios.length));
    // The spread over bins estimates √(2/ν) to about 1/√(2·127) ≈ 6 % relative; allow 25 %.
    expect(Math.abs(spread / estimate.psdRelativeStdError - 1)).toBeLessThan(0.25);
  });

  it('records estimated one by one (as a noise run stores them) combine to the estimate of all records at once', () => {
    const random = new SeededRandom(12);
    const fs = 2e4;
    const records = Array.from({ length: 3 }, () => whiteRecord(random, 3000, 1e-3));
    const together = welchPsdOfRecords(records, fs, { segmentLength: 512 });
    const stored = records.map((record) => welchPsd(record, fs, { segmentLength: 512 }));
    const combined = combineWelchEstimates(stored, { sampleRateHz: fs, segmentLength: 512, window: 'hann' });
    expect(Array.from(combined.psdV2PerHz)).toEqual(Array.from(together.psdV2PerHz));
    expect(combined.degreesOfFreedom).toBe(together.degreesOfFreedom);
    // Hann's equivalent noise bandwidth is 1.5 bins (Heinzel, Rüdiger, Schilling 2002, Table/§C.1 Hanning: NENBW 1.5).
    expect(combined.enbwHz).toBeCloseTo((1.5 * fs) / 512, 9);
    // A record of another segment length cannot join: its bins are other frequencies.
    const other = welchPsd(records[0], fs, { segmentLength: 256 });
    expect(() => combineWelchEstimates([...stored, other], { sampleRateHz: fs, segmentLength: 512, window: 'hann' })).toThrow(/noise record 3.*129 bins where 257/);
  });

  it('refuses an empty list of records', () => {
    expect(() => welchPsdOfRecords([], 1e3, { segmentLength: 256 })).toThrow(/none were given/);
  });
});
