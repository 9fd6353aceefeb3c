/**
 * Welch's estimate over separate records. Expected values: white Gaussian noise
 * of standard deviation σ sampled at fs has the one-sided density 2σ²/fs
 * (Heinzel, Rüdiger, Schilling 2002, §9: the variance spread over 0…fs/2); the
 * spread of the per-bin estimates matches the stated relative standard error
 * √(2/ν) with ν the sum of the records' degrees of freedom (independent χ²
 * variables add; Percival & Walden 1993).
 */
import { describe, expect, it } from 'vitest';
import { welchPsd, welchPsdOfRecords } from '../../../app/signal';
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

  it('refuses an empty list of records', () => {
    expect(() => welchPsdOfRecords([], 1e3, { segmentLength: 256 })).toThrow(/none were given/);
  });
});
