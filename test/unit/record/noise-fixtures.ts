/**
 * A noise run for record tests, made without a bench: white Gaussian records
 * of σ = 10 µV at 25.6 kHz (seeded), each reduced to its Welch estimate as the
 * run does, combined by the real analysis (app/analysis noise-figures) and set
 * against the density white noise has, √(2σ²/fs) (Heinzel, Rüdiger, Schilling
 * 2002, §9). Invented demo data, labelled simulated.
 */
import type { InstrumentInfo, NoiseAcquisition, NoiseRequest, NoiseRunDetail } from '../../../app/contract/contract';
import { noiseRunResult } from '../../../app/analysis';
import { welchPsd } from '../../../app/signal';
import { SeededRandom } from '../../../app/numeric';
import { fixtureBuild } from './fixtures';

const SIGMA_V = 10e-6;
const SAMPLE_RATE_HZ = 25_600;

export const WHITE_DENSITY_V_PER_RTHZ = Math.sqrt((2 * SIGMA_V * SIGMA_V) / SAMPLE_RATE_HZ);

const BENCH: InstrumentInfo[] = [
  { role: 'generator', address: 'tcp://127.0.0.1:5025', profileId: 'scpi-generator', simulated: true, identity: { manufacturer: 'Rolloff simulated bench (simulated)', model: 'simulated generator', serialNumber: 'SIM-GEN-0001', firmware: '0.1.0' } },
  { role: 'scope', address: 'tcp://127.0.0.1:5027', profileId: 'scpi-scope', simulated: true, identity: { manufacturer: 'Rolloff simulated bench (simulated)', model: 'simulated scope', serialNumber: 'SIM-SCP-0001', firmware: '0.1.0' } },
];

export function noiseRunFixture(options: { measurement?: 'scope' | 'meter'; records?: number } = {}): NoiseRunDetail {
  const measurement = options.measurement ?? 'scope';
  const count = options.records ?? 4;
  const request: NoiseRequest = { buildId: fixtureBuild().id, kind: 'noise', fromHz: 200, toHz: 10e3, records: count, segmentLength: 256, window: 'hann', measurement, operator: 'demo operator (invented)', notes: 'invented demo data', maxStimulusVpp: 1 };
  const acquisition: NoiseAcquisition = {
    measurement, sampleRateHz: measurement === 'scope' ? SAMPLE_RATE_HZ : 0, recordPoints: measurement === 'scope' ? 1024 : 0, recordS: measurement === 'scope' ? 1024 / SAMPLE_RATE_HZ : 0.1,
    segmentLength: 256, window: 'hann', overlap: 0.5, expectedRmsV: SIGMA_V, expectedDcV: 0, rangeV: measurement === 'scope' ? 6 * SIGMA_V : 0, settleS: 0.01, sourceImpedanceOhm: 50,
  };
  const random = new SeededRandom(7);
  const estimates = Array.from({ length: count }, () => welchPsd(Float64Array.from({ length: 1024 }, () => SIGMA_V * random.nextGaussian()), SAMPLE_RATE_HZ, { segmentLength: 256 }));
  const records = {
    step: estimates.map((_, i) => i),
    sampleRateHz: estimates.map(() => (measurement === 'scope' ? SAMPLE_RATE_HZ : Number.NaN)),
    segments: estimates.map((e) => (measurement === 'scope' ? e.segments : 0)),
    degreesOfFreedom: estimates.map((e) => (measurement === 'scope' ? e.degreesOfFreedom : 0)),
    rmsV: estimates.map(() => SIGMA_V * (1 + 0.01 * random.nextGaussian())),
    meanV: estimates.map(() => (measurement === 'scope' ? 1e-7 * random.nextGaussian() : Number.NaN)),
    flags: estimates.map(() => 0),
    measuredAt: estimates.map((_, i) => `2026-12-01T10:00:0${i}.000Z`),
  };
  const result = noiseRunResult(request, acquisition, estimates.map((e, i) => ({
    sampleRateHz: records.sampleRateHz[i], segments: records.segments[i], degreesOfFreedom: records.degreesOfFreedom[i],
    psdV2PerHz: measurement === 'scope' ? e.psdV2PerHz : null, rmsV: records.rmsV[i], flags: 0,
  })), {
    densityAt: (frequenciesHz) => Array.from(frequenciesHz, () => WHITE_DENSITY_V_PER_RTHZ),
    rmsOver: (fromHz, toHz) => WHITE_DENSITY_V_PER_RTHZ * Math.sqrt(toHz - fromHz),
  });
  return {
    id: 31, uid: '3e1b7c52-9d4a-4f08-b2c6-7a5e0d9f1c31', offlinePeriods: [], owner: null, buildId: request.buildId, buildLabel: fixtureBuild().label, designName: 'Inverting low-pass (demo, invented)', kind: 'noise', status: 'done',
    startedAt: '2026-12-01T10:00:00.000Z', endedAt: '2026-12-01T10:00:05.000Z', pointCount: count, plannedCount: count, simulated: true, benchName: 'bench 1',
    request, acquisition, bench: BENCH, softwareVersion: '0.1.0', records, density: result.density,
    figures: { minus3dbHz: [], ...(result.figures ? { noise: result.figures } : {}) },
    events: [{ at: '2026-12-01T10:00:00.000Z', level: 'info', message: 'generator held off: output off at the smallest amplitude and no offset, and the generator reports its output off' }],
  };
}
