/**
 * A noise run's figures from its records. Expected values: white Gaussian
 * noise of σ at fs has the density √(2σ²/fs) (Heinzel, Rüdiger, Schilling
 * 2002, §9), and its power over a band B is that density² × B; a 95 % interval
 * holds the true value in about 95 % of bins (its definition; χ² intervals as
 * Percival and Walden 1993).
 */
import { describe, expect, it } from 'vitest';
import { noiseRunResult, type NoiseRecordInput } from '../../../app/analysis';
import { PointFlag, type NoiseAcquisition } from '../../../app/contract/contract';
import { SeededRandom } from '../../../app/numeric';
import { welchPsd } from '../../../app/signal';

const FS = 51_200;
const SIGMA = 1e-5;
const WHITE = Math.sqrt((2 * SIGMA * SIGMA) / FS);
const acquisition: NoiseAcquisition = { measurement: 'scope', sampleRateHz: FS, recordPoints: 4096, recordS: 0.08, segmentLength: 1024, window: 'hann', overlap: 0.5, expectedRmsV: SIGMA, expectedDcV: 0, rangeV: 6 * SIGMA, settleS: 0, sourceImpedanceOhm: 50 };
const theory = { densityAt: (f: Float64Array) => Array.from(f, () => WHITE), rmsOver: (from: number, to: number) => WHITE * Math.sqrt(to - from) };

function records(count: number, seed = 3): NoiseRecordInput[] {
  const random = new SeededRandom(seed);
  return Array.from({ length: count }, () => {
    const e = welchPsd(Float64Array.from({ length: 4096 }, () => SIGMA * random.nextGaussian()), FS, { segmentLength: 1024 });
    return { sampleRateHz: FS, segments: e.segments, degreesOfFreedom: e.degreesOfFreedom, psdV2PerHz: e.psdV2PerHz, rmsV: SIGMA, flags: 0 };
  });
}

describe('noiseRunResult', () => {
  it('white noise: the band\'s bins, each interval holding the true density about 95 % of the time, and the band RMS within 3u', () => {
    const { density, figures, recordsLeftOut } = noiseRunResult({ fromHz: 200, toHz: 20_000 }, acquisition, records(24), theory);
    expect(recordsLeftOut).toBe(0);
    expect(density.frequencyHz[0]).toBeGreaterThanOrEqual(200);
    expect(density.frequencyHz.at(-1)).toBeLessThanOrEqual(20_000);
    expect(figures!.bins).toBe(density.frequencyHz.length);
    expect(figures!.shareWithin95).toBeGreaterThan(0.9);
    expect(figures!.shareWithin95).toBeLessThan(0.99);
    expect(Math.abs(figures!.measuredRmsV - figures!.computedRmsV)).toBeLessThan(3 * figures!.measuredRmsUncertaintyV!);
    // The computed RMS is the same sum over the same bins: density² × bins × Δf.
    expect(figures!.computedRmsV).toBeCloseTo(WHITE * Math.sqrt(figures!.bins! * (FS / 1024)), 15);
  });

  it('leaves out overrange records and counts them; refuses records of two sample rates', () => {
    const input = records(4);
    input[1] = { ...input[1], flags: PointFlag.overrange };
    const result = noiseRunResult({ fromHz: 200, toHz: 20_000 }, acquisition, input, theory);
    expect(result.recordsLeftOut).toBe(1);
    expect(result.figures!.recordsUsed).toBe(3);
    input[2] = { ...input[2], sampleRateHz: FS * 1.01 };
    expect(() => noiseRunResult({ fromHz: 200, toHz: 20_000 }, acquisition, input, theory)).toThrow(/two sample rates cannot be averaged/);
  });

  it('no usable record: no figures yet', () => {
    const result = noiseRunResult({ fromHz: 200, toHz: 20_000 }, acquisition, [], theory);
    expect(result.figures).toBeUndefined();
    expect(result.density.frequencyHz).toEqual([]);
  });
});
