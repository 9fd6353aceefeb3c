/** Invented records the store tests store: one design, builds of it, runs of 41 planned steps, a noise run of 8 records. */
import type { NoisePlanSummary, NoiseRequest, SweepPlanSummary, SweepRequest } from '../../app/contract/contract';
import { SOFTWARE_VERSION } from '../../app/contract/version';
import type { NewNoiseRecord, NewPoint, NewRun, RolloffStore } from '../../app/store';

export const request: SweepRequest = {
  buildId: 1,
  kind: 'ac',
  from: 10,
  to: 100e3,
  pointsPerDecade: 10,
  spacing: 'log',
  amplitude: { mode: 'fixed', vpp: 1 },
  measurement: 'scope',
  minCycles: 5,
  averages: 1,
  refine: false,
  operator: 'demo operator (invented)',
  notes: '',
};

export const plan: SweepPlanSummary = {
  steps: Array.from({ length: 41 }, (_, index) => ({ index, stimulus: 10 * 10 ** (index / 10), amplitudeVpp: 1, settleS: 0.1, integrateS: 0.2 })),
  estimatedDurationS: 60,
  warnings: [],
};

export function point(step: number, overrides: Partial<NewPoint> = {}): NewPoint {
  return {
    step,
    stimulus: 10 * 10 ** (step / 10),
    amplitudeVpp: 1,
    inputReading: 0.5,
    outputReading: 5,
    gainDb: 20 - step * 0.1,
    gainUncertaintyDb: 0.01,
    phaseDeg: 180 - step,
    phaseUncertaintyDeg: 0.1,
    outputV: Number.NaN,
    flags: 0,
    measuredAt: `2026-01-01T00:00:${String(step % 60).padStart(2, '0')}.000Z`,
    ...overrides,
  };
}

export function newRun(buildId: number, overrides: Partial<NewRun> = {}): NewRun {
  return {
    buildId,
    kind: 'ac',
    request: { ...request, buildId },
    plan,
    softwareVersion: SOFTWARE_VERSION,
    bench: [],
    operator: 'demo operator (invented)',
    notes: 'first light',
    simulated: true,
    ...overrides,
  } as NewRun;
}

export const noiseRequest: NoiseRequest = {
  buildId: 1,
  kind: 'noise',
  fromHz: 100,
  toHz: 20e3,
  records: 8,
  segmentLength: 256,
  window: 'hann',
  measurement: 'scope',
  operator: 'demo operator (invented)',
  notes: '',
};

export const noisePlan: NoisePlanSummary = {
  steps: Array.from({ length: 8 }, (_, index) => ({ index, stimulus: 0, amplitudeVpp: 0, settleS: index === 0 ? 0.5 : 0, integrateS: 0.02 })),
  estimatedDurationS: 1,
  warnings: [],
  acquisition: {
    measurement: 'scope', sampleRateHz: 51_200, recordPoints: 1024, recordS: 0.02, segmentLength: 256, window: 'hann', overlap: 0.5,
    expectedRmsV: 2e-5, expectedDcV: 0, rangeV: 0.005, settleS: 0.5, sourceImpedanceOhm: 50,
  },
};

/** A noise record whose PSD (129 bins of a 256-sample segment) holds values no float32 keeps exactly. */
export function noiseRecord(step: number, overrides: Partial<NewNoiseRecord> = {}): NewNoiseRecord {
  return {
    step,
    sampleRateHz: 51_200,
    segments: 7,
    degreesOfFreedom: 13.2,
    psdV2PerHz: Float64Array.from({ length: 129 }, (_, k) => (1 + k / 3) * 1e-16 * (1 + step / 7)),
    rmsV: 2e-5 * (1 + step / 100),
    meanV: -1e-6,
    flags: 0,
    measuredAt: `2026-01-01T00:01:${String(step % 60).padStart(2, '0')}.000Z`,
    ...overrides,
  };
}

export function newNoiseRun(buildId: number, overrides: Partial<NewRun> = {}): NewRun {
  return newRun(buildId, { kind: 'noise', request: { ...noiseRequest, buildId }, plan: noisePlan, ...overrides } as Partial<NewRun>);
}

export async function seedRun(store: RolloffStore, label = 'board 1', notes = 'first light') {
  const design = await store.saveDesign({ name: 'inverting ×10 (demo, invented)', design: { parts: [{ id: 'R1', value: 1e3 }] } });
  const build = await store.createBuild({ designId: design.id, label, notes: 'hand soldered', actualValues: { R1: 998.2 } });
  const run = await store.createRun(newRun(build.id, { notes }));
  return { design, build, run };
}
