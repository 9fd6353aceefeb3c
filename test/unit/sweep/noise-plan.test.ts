/**
 * The noise plan. Expected values: the sample rate is 2.56 × the band's top
 * (the span convention of FFT analysers, common practice, no source), the
 * resolution fs/N, the band's start at least 4 bins up (common practice, no
 * source), the range ±6σ plus the DC level (P(|x| > 6σ) = erfc(6/√2) ≈ 2·10⁻⁹
 * for Gaussian noise), and the settling −ln(10⁻³)·τ ≈ 6.9 τ (settle.ts).
 */
import { describe, expect, it } from 'vitest';
import { planNoise, RECORD_POINTS_LIMIT } from '../../../app/sweep/plan';
import type { NoiseRequest } from '../../../app/contract/contract';
import { ValidationError } from '../../../app/errors';

const request = (overrides: Partial<NoiseRequest> = {}): NoiseRequest => ({
  buildId: 1, kind: 'noise', fromHz: 100, toHz: 20_000, records: 8, segmentLength: 4096, window: 'hann', measurement: 'scope', operator: '', notes: '', ...overrides,
});
const theory = { slowestTimeConstantS: 10e-3, outputDcV: -2e-3, rmsNoiseV: (fromHz: number, toHz: number) => 1e-6 * Math.sqrt(toHz - fromHz) };
const plan = (overrides: Partial<NoiseRequest> = {}) => planNoise({ request: request(overrides), theory, sourceImpedanceOhm: 50, instrumentSettleS: 0.01, meterApertureS: 0.1 });

describe('planNoise', () => {
  it('scope: samples at 2.56 × the band\'s top, records of four segments, range from the computed RMS and DC level', () => {
    const { acquisition: a, steps, estimatedDurationS } = plan();
    expect(a.sampleRateHz).toBe(51_200);
    expect(a.recordPoints).toBe(4 * 4096);
    expect(a.recordS).toBeCloseTo(16_384 / 51_200, 12);
    expect(a.expectedRmsV).toBeCloseTo(1e-6 * Math.sqrt(25_600 - 12.5), 12);
    expect(a.rangeV).toBeCloseTo(2e-3 + 6 * a.expectedRmsV, 12);
    expect(a.settleS).toBeCloseTo(-Math.log(1e-3) * 10e-3, 9);
    expect(steps).toHaveLength(8);
    expect(steps.map((s) => s.settleS)).toEqual([a.settleS, 0, 0, 0, 0, 0, 0, 0]);
    expect(steps.every((s) => s.amplitudeVpp === 0 && s.stimulus === 0)).toBe(true);
    expect(estimatedDurationS).toBeCloseTo(a.settleS + 8 * a.recordS, 12);
  });

  it('records are never longer than the limit most digitizers offer', () => {
    expect(plan({ segmentLength: 65_536, fromHz: 10 }).acquisition.recordPoints).toBe(RECORD_POINTS_LIMIT);
  });

  it('refuses a band whose start is below four bins, naming the segment length that works', () => {
    let error: unknown;
    try {
      plan({ fromHz: 10 });
    } catch (caught) {
      error = caught;
    }
    expect(error).toBeInstanceOf(ValidationError);
    expect((error as ValidationError).where).toBe('segmentLength');
    // 4 bins of 51.2 kHz / N below 10 Hz needs N ≥ 20480: the next power of two is 32768.
    expect((error as ValidationError).hint).toMatch(/at least 32768, or start the band at 50 Hz or above/);
    expect(() => plan({ fromHz: 0.5, toHz: 100_000 })).toThrow(expect.objectContaining({ hint: expect.stringMatching(/No segment up to 65536 samples resolves this band in one run: measure it as two runs/) }));
  });

  it('meter: one reading per record over the aperture, compared over the band, and says how the band is meant', () => {
    const { acquisition: a, warnings } = plan({ measurement: 'meter' });
    expect(a).toMatchObject({ measurement: 'meter', sampleRateHz: 0, recordPoints: 0, recordS: 0.1, rangeV: 0 });
    expect(a.expectedRmsV).toBeCloseTo(1e-6 * Math.sqrt(20_000 - 100), 12);
    expect(warnings[0]).toMatch(/meter's noise bandwidth/);
  });
});
