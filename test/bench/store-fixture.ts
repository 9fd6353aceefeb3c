/**
 * The one invented run both store benchmarks write: a 1,000-step log sweep
 * (10 Hz to 1 MHz at 200 per decade) and its points. Shared so that
 * store.ts and store-compare.ts measure the same work.
 */
import type { SweepPlanSummary, SweepRequest } from '../../app/contract/contract';
import type { NewPoint } from '../../app/store';

export const POINTS_PER_RUN = 1000;

export const request: SweepRequest = {
  buildId: 1, kind: 'ac', from: 10, to: 1e6, pointsPerDecade: 200, spacing: 'log', amplitude: { mode: 'fixed', vpp: 1 },
  measurement: 'scope', minCycles: 5, averages: 1, refine: false, operator: 'benchmark (invented)', notes: '',
};

export const plan: SweepPlanSummary = {
  steps: Array.from({ length: POINTS_PER_RUN }, (_, index) => ({ index, stimulus: 10 * 10 ** (index / 200), amplitudeVpp: 1, settleS: 0.05, integrateS: 0.1 })),
  estimatedDurationS: 300,
  warnings: [],
};

export const points: NewPoint[] = plan.steps.map((s) => ({
  step: s.index, stimulus: s.stimulus, amplitudeVpp: 1, inputReading: 0.5, outputReading: 5,
  gainDb: 20 - s.index * 0.01, gainUncertaintyDb: 0.01, phaseDeg: 180 - s.index * 0.1, phaseUncertaintyDeg: 0.1,
  outputV: Number.NaN, flags: 0, measuredAt: '2026-01-01T00:00:00.000Z',
}));
