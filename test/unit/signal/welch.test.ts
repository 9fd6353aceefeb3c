/**
 * Welch's method on seeded white Gaussian noise of known level. Sources:
 * - [P] Parseval: white noise of variance σ² sampled at fs has the one-sided
 *   density 2σ²/fs V²/Hz, flat from 0 to fs/2 (Heinzel, Rüdiger, Schilling,
 *   "Spectrum and spectral density estimation by the DFT", 2002, §9).
 * - [H] Heinzel et al. 2002, window table: Hann ENBW = 1.5 bins; at 50 %
 *   overlap Σw_n·w_{n+N/2}/Σw² = 1/6 for Hann (recalled from memory).
 * - [PW] Percival & Walden 1993 eq. (292b): ν = 2K/(1 + 2Σ(1 − m/K)ρ(m));
 *   non-overlapped rectangular segments give ν = 2K exactly, and an averaged
 *   periodogram bin is S·χ²_ν/ν, so its relative standard deviation is √(2/ν).
 */
import { describe, expect, it } from 'vitest';
import { ValidationError } from '../../../app/errors';
import { welchPsd } from '../../../app/signal';
import { seededGaussian } from '../../helpers/test-signals';
import { covers, expectCoverage, scaledInterval } from '../../helpers/coverage';

const SAMPLE_RATE_HZ = 100e3;
const SIGMA_V = 1e-3;
const TRUE_PSD = (2 * SIGMA_V * SIGMA_V) / SAMPLE_RATE_HZ;
const N = 512;

function record(seed: number, length: number): Float64Array {
  const gaussian = seededGaussian(seed);
  return Float64Array.from({ length }, () => SIGMA_V * gaussian());
}

/** Every third interior bin: Hann leakage correlates neighbours, bins three apart are nearly independent. */
function separatedBins(bins: number): number[] {
  const picked: number[] = [];
  for (let b = 3; b < bins - 3; b += 3) picked.push(b);
  return picked;
}

describe('Welch PSD of white noise', () => {
  const estimate = welchPsd(record(11, 16 * N), SAMPLE_RATE_HZ, { segmentLength: N });

  it('segments, resolution, ENBW (Hann: 1.5 bins [H]) and ν from the window overlap [PW]', () => {
    expect(estimate.segments).toBe(31); // (16N − N)/(N/2) + 1
    expect(estimate.resolutionHz).toBe(SAMPLE_RATE_HZ / N);
    expect(estimate.enbwHz / estimate.resolutionHz).toBeCloseTo(1.5, 12);
    // [PW] with K = 31 and only the neighbour overlapping: ν = 62/(1 + 2·(30/31)·ρ(1)), ρ(1) = (1/6)² [H].
    const rho1 = (1 / 6) ** 2;
    expect(estimate.degreesOfFreedom).toBeCloseTo(62 / (1 + 2 * (30 / 31) * rho1), 6);
    const rectangular = welchPsd(record(12, 16 * N), SAMPLE_RATE_HZ, { segmentLength: N, window: 'rectangular', overlap: 0 });
    expect(rectangular.segments).toBe(16);
    expect(rectangular.degreesOfFreedom).toBe(32);
    expect(rectangular.psdRelativeStdError).toBeCloseTo(0.25, 12);
  });

  it('the level is 2σ²/fs [P] within its stated uncertainty', () => {
    const bins = separatedBins(estimate.psdV2PerHz.length);
    const ratios = bins.map((b) => estimate.psdV2PerHz[b] / TRUE_PSD);
    const mean = ratios.reduce((a, b) => a + b, 0) / ratios.length;
    // Standard error of the mean over independent bins: √(2/ν)/√bins; allow 4 of them.
    expect(Math.abs(mean - 1)).toBeLessThan((4 * estimate.psdRelativeStdError) / Math.sqrt(bins.length));
    // (The 95 % interval's coverage needs more bins than one record has for a two-sided check: see the next test.)
    expect(estimate.densityVPerRtHz[bins[0]]).toBeCloseTo(Math.sqrt(estimate.psdV2PerHz[bins[0]]), 20);
  });

  it('the stated uncertainty is right: the spread over 300 records matches √(2/ν), and the 95 % interval covers 95 %', () => {
    const ratios: number[] = [];
    const covered = { stated: 0, widened: 0, narrowed: 0 };
    let stated = 0;
    for (let r = 0; r < 300; r++) {
      const e = welchPsd(record(1000 + r, 16 * N), SAMPLE_RATE_HZ, { segmentLength: N });
      stated = e.psdRelativeStdError;
      for (const b of separatedBins(e.psdV2PerHz.length)) {
        const ratio = e.psdV2PerHz[b] / TRUE_PSD;
        ratios.push(ratio);
        // The interval holds the true PSD as factors of the estimate: in units of the truth, [low·ratio, high·ratio] ∋ 1.
        const interval = e.psdInterval95.map((factor) => factor * ratio) as [number, number];
        if (covers(interval, 1)) covered.stated++;
        if (covers(scaledInterval(interval, ratio, 1.5, 'log'), 1)) covered.widened++;
        if (covers(scaledInterval(interval, ratio, 0.75, 'log'), 1)) covered.narrowed++;
      }
    }
    const m = ratios.length;
    const mean = ratios.reduce((a, b) => a + b, 0) / m;
    const spread = Math.sqrt(ratios.reduce((a, b) => a + (b - mean) ** 2, 0) / (m - 1));
    // Standard error of a sample standard deviation: σ·√((κ − 1)/(4m)) with the
    // excess-kurtosis of χ²_ν/ν, κ = 3 + 12/ν (standard result; recalled from memory).
    const nu = 2 / stated ** 2;
    const seOfSpread = stated * Math.sqrt((2 + 12 / nu) / (4 * m));
    expect(Math.abs(spread - stated)).toBeLessThan(4 * seOfSpread);
    expect(4 * seOfSpread).toBeLessThan(0.1 * stated); // the check is tight enough to mean something
    expect(Math.abs(mean - 1)).toBeLessThan((4 * stated) / Math.sqrt(m));
    // Coverage within 95 % ± 4 binomial standard errors (test/helpers/coverage.ts): m ≈ 25,000 bins, ±0.55 %.
    // The same intervals 1.5× as wide (on the log scale) or ¾ as wide are caught.
    const [low, high] = expectCoverage(covered.stated, m, 0.95, 'Welch 95 % interval');
    expect(covered.widened / m).toBeGreaterThan(high);
    expect(covered.narrowed / m).toBeLessThan(low);
  });

  it('a wrong uncertainty would be caught: the rectangular, non-overlapped spread is larger, as ν = 2K says', () => {
    const ratios: number[] = [];
    for (let r = 0; r < 100; r++) {
      const e = welchPsd(record(5000 + r, 16 * N), SAMPLE_RATE_HZ, { segmentLength: N, window: 'rectangular', overlap: 0 });
      for (const b of separatedBins(e.psdV2PerHz.length)) ratios.push(e.psdV2PerHz[b] / TRUE_PSD);
    }
    const mean = ratios.reduce((a, b) => a + b, 0) / ratios.length;
    const spread = Math.sqrt(ratios.reduce((a, b) => a + (b - mean) ** 2, 0) / (ratios.length - 1));
    expect(spread).toBeGreaterThan(0.23);
    expect(spread).toBeLessThan(0.27); // √(2/32) = 0.25
    expect(spread).toBeGreaterThan(estimate.psdRelativeStdError * 1.3); // Hann at 50 % averages better
  });

  it('refuses bad settings with the setting named', () => {
    const samples = record(1, 4096);
    expect(() => welchPsd(samples, SAMPLE_RATE_HZ, { segmentLength: 1000 })).toThrow(/power of two/);
    expect(() => welchPsd(samples, SAMPLE_RATE_HZ, { segmentLength: 8192 })).toThrow(ValidationError);
    expect(() => welchPsd(samples, 0, { segmentLength: 256 })).toThrow(/sample rate/);
    expect(() => welchPsd(samples, SAMPLE_RATE_HZ, { segmentLength: 256, overlap: 1 })).toThrow(/overlap/);
    expect(() => welchPsd([0, NaN, ...samples], SAMPLE_RATE_HZ, { segmentLength: 256 })).toThrow(/noise record\[1\]/);
  });
});
