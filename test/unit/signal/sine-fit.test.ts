import { describe, expect, it } from 'vitest';
import { ValidationError } from '../../../app/errors';
import {
  cramerRaoSinusoid,
  cramerRaoSinusoidExact,
  distortionScore,
  looksDistorted,
  sineFit3,
  twoChannelResponse,
} from '../../../app/signal';
import { noisySine, seededGaussian } from '../../helpers/test-signals';

const record = { frequencyHz: 1000, sampleIntervalS: 1e-5, sampleCount: 500 }; // 5 cycles

function monteCarlo(trials: number, truth: { amplitudeV: number; phaseRad: number; offsetV: number; noiseStdV: number }, seed: number) {
  const gaussian = seededGaussian(seed);
  const amplitude = new Float64Array(trials);
  const phase = new Float64Array(trials);
  const offset = new Float64Array(trials);
  const reportedAmplitudeStd = new Float64Array(trials);
  const reportedPhaseStd = new Float64Array(trials);
  for (let k = 0; k < trials; k++) {
    const fit = sineFit3({ samplesV: noisySine({ ...record, ...truth }, gaussian), sampleIntervalS: record.sampleIntervalS, frequencyHz: record.frequencyHz });
    amplitude[k] = fit.amplitudeV;
    phase[k] = fit.phaseRad;
    offset[k] = fit.offsetV;
    reportedAmplitudeStd[k] = fit.amplitudeStdV;
    reportedPhaseStd[k] = fit.phaseStdRad;
  }
  return { amplitude, phase, offset, reportedAmplitudeStd, reportedPhaseStd };
}

function mean(values: Float64Array): number {
  return values.reduce((a, b) => a + b, 0) / values.length;
}

function variance(values: Float64Array): number {
  const m = mean(values);
  return values.reduce((a, b) => a + (b - m) ** 2, 0) / (values.length - 1);
}

describe('sineFit3 (IEEE Std 1057 three-parameter fit)', () => {
  it('recovers amplitude, phase and offset of a noiseless record to rounding', () => {
    // Expected values: the parameters the synthetic record was built from (common practice, no source).
    const samplesV = noisySine({ ...record, amplitudeV: 0.75, phaseRad: -2.1, offsetV: 0.05, noiseStdV: 0 }, () => 0);
    const fit = sineFit3({ samplesV, sampleIntervalS: record.sampleIntervalS, frequencyHz: record.frequencyHz });
    expect(fit.amplitudeV).toBeCloseTo(0.75, 12);
    expect(fit.phaseRad).toBeCloseTo(-2.1, 12);
    expect(fit.offsetV).toBeCloseTo(0.05, 12);
    expect(fit.residualRmsV).toBeLessThan(1e-12);
  });

  it('refers the phase to t = 0 when the record starts later', () => {
    // A record starting at t0 of A·cos(ωt + φ) is the same sine: φ must come back unchanged (model definition, no source).
    const omega = 2 * Math.PI * 50;
    const startTimeS = 0.0123;
    const samplesV = Float64Array.from({ length: 400 }, (_, i) => Math.cos(omega * (startTimeS + i * 1e-4) + 0.4));
    expect(sineFit3({ samplesV, sampleIntervalS: 1e-4, frequencyHz: 50, startTimeS }).phaseRad).toBeCloseTo(0.4, 10);
  });

  it('is unbiased over many seeded noisy records (mean error within 4 standard errors)', () => {
    const truth = { amplitudeV: 1, phaseRad: 0.7, offsetV: -0.2, noiseStdV: 0.1 };
    const trials = 1000;
    const result = monteCarlo(trials, truth, 11);
    // Unbiasedness of linear least squares (Gauss–Markov); amplitude bias is O(σ²/A), far below the tolerance here.
    for (const [values, expected] of [[result.amplitude, truth.amplitudeV], [result.phase, truth.phaseRad], [result.offset, truth.offsetV]] as const) {
      const standardError = Math.sqrt(variance(values) / trials);
      expect(Math.abs(mean(values) - expected)).toBeLessThan(4 * standardError);
    }
  });

  it('reaches the Cramér–Rao bound for amplitude and phase, and reports matching uncertainties', () => {
    const truth = { amplitudeV: 1, phaseRad: 0.7, offsetV: -0.2, noiseStdV: 0.1 };
    const trials = 1000;
    const result = monteCarlo(trials, truth, 29);
    // Bound: Kay 1993, Example 3.14, known-frequency form var(A) ≥ 2σ²/N, var(φ) ≥ 2σ²/(N·A²) (recalled from memory).
    const bound = cramerRaoSinusoid(truth.amplitudeV, truth.noiseStdV, record.sampleCount);
    // With 1000 trials a sample variance scatters by √(2/999) ≈ 4.5 %: ±15 % is over 3 standard deviations.
    expect(variance(result.amplitude) / bound.amplitudeVarianceV2).toBeGreaterThan(0.85);
    expect(variance(result.amplitude) / bound.amplitudeVarianceV2).toBeLessThan(1.15);
    expect(variance(result.phase) / bound.phaseVarianceRad2).toBeGreaterThan(0.85);
    expect(variance(result.phase) / bound.phaseVarianceRad2).toBeLessThan(1.15);
    // The per-record uncertainty (covariance of the linear LS estimate) estimates the same spread.
    expect(mean(result.reportedAmplitudeStd) / Math.sqrt(variance(result.amplitude))).toBeGreaterThan(0.9);
    expect(mean(result.reportedAmplitudeStd) / Math.sqrt(variance(result.amplitude))).toBeLessThan(1.1);
    expect(mean(result.reportedPhaseStd) / Math.sqrt(variance(result.phase))).toBeGreaterThan(0.9);
    expect(mean(result.reportedPhaseStd) / Math.sqrt(variance(result.phase))).toBeLessThan(1.1);
  });

  it('reports the signal-to-noise ratio of the record', () => {
    // SNR = (A²/2)/σ² = 0.5/0.0001 → 36.99 dB (definition of SNR for a sine in white noise, no source).
    const gaussian = seededGaussian(5);
    const samplesV = noisySine({ ...record, sampleCount: 20000, sampleIntervalS: 1e-6, amplitudeV: 1, phaseRad: 0, offsetV: 0, noiseStdV: 0.01 }, gaussian);
    expect(sineFit3({ samplesV, sampleIntervalS: 1e-6, frequencyHz: 1000 }).snrDb).toBeCloseTo(36.99, 0);
  });

  it('refuses records it cannot fit, saying where', () => {
    const good = new Float64Array(100).fill(0.1);
    expect(() => sineFit3({ samplesV: good.subarray(0, 3), sampleIntervalS: 1e-3, frequencyHz: 10 })).toThrow(/at least 4/);
    const withGap = Float64Array.from(good);
    withGap[17] = Number.NaN;
    expect(() => sineFit3({ samplesV: withGap, sampleIntervalS: 1e-3, frequencyHz: 10 })).toThrow(/samplesV\[17\]/);
    expect(() => sineFit3({ samplesV: good, sampleIntervalS: 1e-3, frequencyHz: 500 })).toThrow(ValidationError);
    expect(() => sineFit3({ samplesV: good, sampleIntervalS: 0, frequencyHz: 10 })).toThrow(/sampleIntervalS/);
    expect(() => sineFit3({ samplesV: good, sampleIntervalS: 1e-3, frequencyHz: -1 })).toThrow(/frequencyHz/);
  });
});

describe('cramerRaoSinusoid', () => {
  it('gives 2σ²/N and 2σ²/(N·A²), and the exact bound approaches it over whole cycles', () => {
    // Kay 1993, Example 3.14 with known frequency (recalled from memory): A = 2, σ = 0.1, N = 1000.
    const asymptotic = cramerRaoSinusoid(2, 0.1, 1000);
    expect(asymptotic.amplitudeVarianceV2).toBeCloseTo(2e-5, 12);
    expect(asymptotic.phaseVarianceRad2).toBeCloseTo(5e-6, 12);
    const exact = cramerRaoSinusoidExact({ amplitudeV: 2, phaseRad: 0.3, frequencyHz: 100, sampleIntervalS: 1e-4, sampleCount: 1000, noiseStdV: 0.1 });
    expect(exact.amplitudeVarianceV2 / asymptotic.amplitudeVarianceV2).toBeCloseTo(1, 6);
    expect(exact.phaseVarianceRad2 / asymptotic.phaseVarianceRad2).toBeCloseTo(1, 6);
    // Over a fraction of a cycle the offset and the sine are hard to separate: the exact bound must exceed the asymptotic one.
    const short = cramerRaoSinusoidExact({ amplitudeV: 2, phaseRad: 0.3, frequencyHz: 100, sampleIntervalS: 1e-6, sampleCount: 1000, noiseStdV: 0.1 });
    expect(short.amplitudeVarianceV2).toBeGreaterThan(10 * asymptotic.amplitudeVarianceV2);
  });
});

describe('twoChannelResponse', () => {
  it('gives the gain and phase of the stage with uncertainties that match the scatter', () => {
    // Output = 0.5 × input, lagging 30°: −6.0206 dB (20·log10 0.5) and −30° (construction of the records, no source).
    const gaussian = seededGaussian(77);
    const trials = 400;
    const gains = new Float64Array(trials);
    const phases = new Float64Array(trials);
    const reportedGainStd = new Float64Array(trials);
    const reportedPhaseStd = new Float64Array(trials);
    for (let k = 0; k < trials; k++) {
      const input = noisySine({ ...record, amplitudeV: 1, phaseRad: 1, offsetV: 0, noiseStdV: 0.02 }, gaussian);
      const output = noisySine({ ...record, amplitudeV: 0.5, phaseRad: 1 - Math.PI / 6, offsetV: 0.01, noiseStdV: 0.02 }, gaussian);
      const response = twoChannelResponse({ samplesV: input, sampleIntervalS: record.sampleIntervalS }, { samplesV: output, sampleIntervalS: record.sampleIntervalS }, record.frequencyHz);
      gains[k] = response.gainDb;
      phases[k] = response.phaseDeg;
      reportedGainStd[k] = response.gainStdDb;
      reportedPhaseStd[k] = response.phaseStdDeg;
    }
    expect(mean(gains)).toBeCloseTo(-6.0206, 2);
    expect(mean(phases)).toBeCloseTo(-30, 1);
    const gainRatio = mean(reportedGainStd) / Math.sqrt(variance(gains));
    const phaseRatio = mean(reportedPhaseStd) / Math.sqrt(variance(phases));
    // 400 trials: a sample standard deviation scatters by ≈ 3.5 %; ±15 % allows for that (common practice, no source).
    expect(gainRatio).toBeGreaterThan(0.85);
    expect(gainRatio).toBeLessThan(1.15);
    expect(phaseRatio).toBeGreaterThan(0.85);
    expect(phaseRatio).toBeLessThan(1.15);
  });

  it('wraps the phase difference into (−180°, 180°]', () => {
    const input = noisySine({ ...record, amplitudeV: 1, phaseRad: 3, offsetV: 0, noiseStdV: 0 }, () => 0);
    const output = noisySine({ ...record, amplitudeV: 1, phaseRad: -3, offsetV: 0, noiseStdV: 0 }, () => 0);
    // −6 rad = −343.77° ≡ +16.23° (wrapping, no source).
    const response = twoChannelResponse({ samplesV: input, sampleIntervalS: record.sampleIntervalS }, { samplesV: output, sampleIntervalS: record.sampleIntervalS }, record.frequencyHz);
    expect(response.phaseDeg).toBeCloseTo(16.2254, 3);
  });
});

describe('distortionScore', () => {
  const cycles = { frequencyHz: 1000, sampleIntervalS: 1e-6, sampleCount: 10000 }; // 10 whole cycles

  it('scores a triangle wave at its total harmonic distortion, √(π⁴/96 − 1) ≈ 0.1212', () => {
    // Triangle Fourier series: odd harmonics with amplitudes ∝ 1/k², so THD = √(Σ 1/k⁴ − 1) over odd k = √(π⁴/96 − 1)
    // (standard Fourier series of the triangle wave; Σ odd 1/k⁴ = π⁴/96).
    const samplesV = Float64Array.from({ length: cycles.sampleCount }, (_, i) => {
      const phase = ((i * cycles.sampleIntervalS * cycles.frequencyHz) % 1 + 1) % 1;
      return 1 - 4 * Math.abs(phase - 0.5);
    });
    const fit = sineFit3({ samplesV, sampleIntervalS: cycles.sampleIntervalS, frequencyHz: cycles.frequencyHz });
    expect(distortionScore(fit)).toBeCloseTo(Math.sqrt(Math.PI ** 4 / 96 - 1), 3);
    expect(looksDistorted(fit)).toBe(true);
  });

  it('passes a clean record at 40 dB SNR and flags one clipped at 80 % of its peak', () => {
    // Threshold 3 %: common practice, no source. At 40 dB SNR the residual is 1 % of the sine RMS.
    const gaussian = seededGaussian(3);
    const clean = noisySine({ ...cycles, amplitudeV: 1, phaseRad: 0, offsetV: 0, noiseStdV: 0.01 / Math.SQRT2 }, gaussian);
    const cleanFit = sineFit3({ samplesV: clean, sampleIntervalS: cycles.sampleIntervalS, frequencyHz: cycles.frequencyHz });
    expect(distortionScore(cleanFit)).toBeCloseTo(0.01, 3);
    expect(looksDistorted(cleanFit)).toBe(false);
    const clipped = Float64Array.from(noisySine({ ...cycles, amplitudeV: 1, phaseRad: 0, offsetV: 0, noiseStdV: 0 }, () => 0), (v) => Math.max(-0.8, Math.min(0.8, v)));
    const clippedFit = sineFit3({ samplesV: clipped, sampleIntervalS: cycles.sampleIntervalS, frequencyHz: cycles.frequencyHz });
    expect(looksDistorted(clippedFit)).toBe(true);
  });
});
