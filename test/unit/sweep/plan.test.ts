/**
 * Sweep planning. The circuit is described to the plan through PlanTheory;
 * here it is an analytic first-order inverting low-pass (gain −10, f_c = 1 kHz,
 * rails ±12 V, slew 0.5 V/µs) so expected values come from handbook formulas.
 */
import { describe, expect, it } from 'vitest';
import { planSweep, refinementFrequencies, settleTimeS, integrationTimeS, toPlanSummary, type PlanInput, type PlanTheory } from '../../../app/sweep/plan';
import { minus3dbFrequenciesHz } from '../../../app/analysis';
import { ValidationError } from '../../../app/errors';
import type { SweepRequest } from '../../../app/contract/contract';
import { dbFromRatio } from '../../../app/units';

const GAIN = 10;
const CORNER_HZ = 1000;
const TAU_S = 1 / (2 * Math.PI * CORNER_HZ); // handbook: τ = RC = 1/(2π f_c)
const RAIL_V = 12;
const SLEW_V_PER_S = 0.5e6;

const gainRatioAt = (f: number) => GAIN / Math.hypot(1, f / CORNER_HZ);
const theory: PlanTheory = {
  slowestTimeConstantS: TAU_S,
  gainRatioAt,
  // Full-power bandwidth: output peak ≤ min(rail, SR/(2πf)) (DEVELOPERS.md "Theory"), divided by |H| for the input.
  stimulusLimitVpkAt: (f) => Math.min(RAIL_V, SLEW_V_PER_S / (2 * Math.PI * f)) / gainRatioAt(f),
};

function request(overrides: Partial<SweepRequest> = {}): SweepRequest {
  return {
    buildId: 1, kind: 'ac', from: 10, to: 100_000, pointsPerDecade: 10, spacing: 'log',
    amplitude: { mode: 'auto' }, measurement: 'scope', minCycles: 5, averages: 1, refine: true,
    operator: 'test', notes: '', ...overrides,
  };
}

function input(overrides: Partial<PlanInput> = {}): PlanInput {
  return {
    request: request(),
    maxStimulusVpp: 1,
    instruments: { generator: { minFrequencyHz: 1e-3, maxFrequencyHz: 20e6, maxAmplitudeVpp: 20, minAmplitudeVpp: 0.002 }, measurementMaxVpk: 10, instrumentSettleS: 0.001, minIntegrationS: 0.02 },
    theory,
    ...overrides,
  };
}

describe('amplitude never exceeds the user maximum', () => {
  it('automatic amplitude stays ≤ max at every step over many seeded random requests', () => {
    // Seeded LCG (Numerical Recipes constants, common practice) so the case list is reproducible.
    let state = 12345;
    const random = () => ((state = (state * 1664525 + 1013904223) >>> 0) / 2 ** 32);
    let checked = 0;
    for (let trial = 0; trial < 200; trial++) {
      const maxVpp = 0.01 + random() * 30;
      const from = 1 + random() * 1000;
      const target = random() < 0.5 ? undefined : random() * 50;
      const plan = planSweep(input({ maxStimulusVpp: maxVpp, request: request({ from, to: from * (10 + random() * 1e4), amplitude: { mode: 'auto', targetOutputVpp: target } }) }));
      for (const vpp of plan.columns.amplitudeVpp) {
        expect(vpp).toBeLessThanOrEqual(maxVpp);
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(1000);
  });

  it('keeps the output inside the rails and slew limit with margin 0.8 (full-power bandwidth SR/(2π·Vp))', () => {
    const plan = planSweep(input({ maxStimulusVpp: 20 }));
    plan.columns.stimulus.forEach((f, i) => {
      const outputVpk = (plan.columns.amplitudeVpp[i] / 2) * gainRatioAt(f);
      expect(outputVpk).toBeLessThanOrEqual(0.8 * Math.min(RAIL_V, SLEW_V_PER_S / (2 * Math.PI * f)) * (1 + 1e-12));
    });
  });

  it('refuses a fixed amplitude above the maximum with a ValidationError, never clamps it silently', () => {
    expect(() => planSweep(input({ request: request({ amplitude: { mode: 'fixed', vpp: 2 } }) }))).toThrow(ValidationError);
    expect(() => planSweep(input({ request: request({ amplitude: { mode: 'fixed', vpp: 2 } }) }))).toThrow(/exceeds the maximum stimulus 1 Vpp/);
  });

  it('warns where a fixed amplitude would clip or slew', () => {
    const plan = planSweep(input({ maxStimulusVpp: 5, request: request({ amplitude: { mode: 'fixed', vpp: 4 } }) }));
    expect(plan.warnings.join(' ')).toMatch(/slew-rate limit/);
  });

  it('refuses a DC sweep whose largest level exceeds the maximum stimulus (a DC level V counts as 2·|V|)', () => {
    expect(() => planSweep(input({ maxStimulusVpp: 2, request: request({ kind: 'dc', from: 1e-3, to: 5 }) }))).toThrow(/5 V counts as 10 Vpp, above the maximum stimulus 2 Vpp/);
  });

  it('refuses frequencies outside the generator range, naming the field', () => {
    expect(() => planSweep(input({ request: request({ to: 1e9 }) }))).toThrow(/^to: /);
  });
});

describe('settling follows the circuit time constant', () => {
  it('waits −ln(0.001)·τ = 6.908 τ when the circuit is slower than the instrument (handbook: RC step response e^(−t/τ))', () => {
    expect(settleTimeS(TAU_S, 0)).toBeCloseTo(6.9078 * TAU_S, 6);
    const plan = planSweep(input());
    expect(plan.columns.settleS[0]).toBeCloseTo(-Math.log(1e-3) * TAU_S, 12);
  });

  it('scales linearly with τ and falls back to the instrument settle time for a fast circuit', () => {
    expect(settleTimeS(10 * TAU_S, 0) / settleTimeS(TAU_S, 0)).toBeCloseTo(10, 12);
    expect(settleTimeS(1e-9, 0.05)).toBe(0.05);
  });

  it('integrates over whole cycles, at least minCycles and the instrument aperture (common practice, no source)', () => {
    expect(integrationTimeS(1000, 5, 0.02)).toBeCloseTo(0.02, 12); // 20 whole cycles
    expect(integrationTimeS(10, 5, 0.02)).toBeCloseTo(0.5, 12); // 5 cycles of 100 ms
    expect(integrationTimeS(333, 1, 0.02) * 333).toBeCloseTo(7, 9); // ceil(0.02·333) = 7 cycles
  });

  it('estimates duration as Σ settle + averages·integrate', () => {
    const plan = planSweep(input({ request: request({ averages: 3 }) }));
    let sum = 0;
    plan.columns.stimulus.forEach((_, i) => (sum += plan.columns.settleS[i] + 3 * plan.columns.integrateS[i]));
    expect(toPlanSummary(plan).estimatedDurationS).toBeCloseTo(sum, 9);
  });
});

describe('refinement', () => {
  it('lands the −3 dB estimate within 0.1 % of f_c = 1 kHz after two rounds from a 3-per-decade grid (handbook f_c)', () => {
    // From 13 Hz so no coarse point falls on 1 kHz by accident.
    const coarse = planSweep(input({ request: request({ from: 13, pointsPerDecade: 3 }) })).columns.stimulus;
    const frequencyHz = Array.from(coarse);
    const coarseCorner = minus3dbFrequenciesHz(frequencyHz, frequencyHz.map((f) => dbFromRatio(gainRatioAt(f))), dbFromRatio(GAIN))[0];
    for (let round = 0; round < 2; round++) {
      const gainDb = frequencyHz.map((f) => dbFromRatio(gainRatioAt(f)));
      frequencyHz.push(...refinementFrequencies({ frequencyHz, gainDb }));
    }
    const gainDb = frequencyHz.map((f) => dbFromRatio(gainRatioAt(f)));
    const corner = minus3dbFrequenciesHz(frequencyHz, gainDb, dbFromRatio(GAIN))[0];
    expect(Math.abs(corner / CORNER_HZ - 1)).toBeLessThan(1e-3);
    expect(Math.abs(corner / CORNER_HZ - 1)).toBeLessThan(Math.abs(coarseCorner / CORNER_HZ - 1));
    expect(frequencyHz.some((f) => Math.abs(f / CORNER_HZ - 1) < 0.01)).toBe(true);
  });

  it('adds nothing once a point sits on the crossing', () => {
    const frequencyHz = [10, 20, 50, 100, CORNER_HZ, 10_000];
    const gainDb = frequencyHz.map((f) => dbFromRatio(gainRatioAt(f)));
    expect(refinementFrequencies({ frequencyHz, gainDb })).toEqual([]);
  });
});
