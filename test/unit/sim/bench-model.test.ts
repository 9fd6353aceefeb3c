/**
 * The virtual bench's signal model. Expected values: divider V_in = V·R_in/(R_in+50)
 * (Ohm's law; the inverting stage's input impedance is R1 at its virtual
 * ground); inverting gain −R2/R1 (handbook formula); full-power bandwidth: a
 * slew-limited sine of peak Vp above SR/(2π·Vp) becomes a triangle of peak
 * SR/(4f) (handbook formula for a slew-limited triangle: it ramps ±Vp at SR
 * in half a period); clipping at the rails; settling as e^(−t/τ) (our stated
 * model, τ = R2·C1 for a first-order stage: handbook formula).
 */
import { describe, expect, it } from 'vitest';
import { BenchModel } from '../../../app/sim/bench-model';
import { CircuitUnderTest } from '../../../app/sim/circuit-under-test';
import type { BenchClock } from '../../../app/bench';
import { parseDesign } from '../../../app/circuit';

/** A clock the test moves by hand, so transients are checked at exact times. */
function manualClock(): BenchClock & { set(t: number): void } {
  let now = 0;
  return { timeScale: 1, nowS: () => now, sleepS: async () => undefined, set: (t: number) => (now = t) };
}

const invertingStage = (extra: object[] = [], opamp: object = { openLoopGain: 1e7, gbw: 1e9 }) =>
  parseDesign({
    name: 'inverting ×−10 (invented)',
    input: 'in',
    output: 'out',
    parts: [
      { id: 'R1', type: 'resistor', nodes: ['in', 'inv'], value: '1k' },
      { id: 'R2', type: 'resistor', nodes: ['inv', 'out'], value: '10k' },
      ...extra,
      { id: 'U1', type: 'opamp', nodes: ['0', 'inv', 'out'], model: opamp },
    ],
  });

const peak = (samples: Float64Array) => Math.max(...samples.map(Math.abs));

describe('BenchModel', () => {
  it('loads the 50 Ω source with the stage input resistance and applies the stage gain', () => {
    const clock = manualClock();
    const model = new BenchModel(new CircuitUnderTest(invertingStage(), 50), clock, 0, 1);
    model.setGenerator({ on: true, shape: 'sine', frequencyHz: 100, emfAmplitudeVpk: 1, emfOffsetV: 0 });
    clock.set(1);
    const input = model.sample('input', 1, 1e-5, 1000);
    const output = model.sample('output', 1, 1e-5, 1000);
    expect(peak(input)).toBeCloseTo(1000 / 1050, 3);
    expect(peak(output)).toBeCloseTo((10 * 1000) / 1050, 2);
    // Inverting: output is minus ten times the input at every instant.
    for (let i = 0; i < 1000; i += 97) expect(output[i]).toBeCloseTo(-10 * input[i], 3);
  });

  it('clips at the rails', () => {
    const clock = manualClock();
    const model = new BenchModel(new CircuitUnderTest(invertingStage([], { openLoopGain: 1e7, gbw: 1e9, rails: [-5, 4] }), 50), clock, 0, 1);
    model.setGenerator({ on: true, shape: 'sine', frequencyHz: 100, emfAmplitudeVpk: 1, emfOffsetV: 0 });
    clock.set(1);
    const output = model.sample('output', 1, 1e-5, 1000);
    expect(Math.max(...output)).toBeCloseTo(4, 9);
    expect(Math.min(...output)).toBeCloseTo(-5, 9);
  });

  it('turns a sine above the full-power bandwidth into a triangle of peak SR/(4f)', () => {
    const slewRate = 5e5;
    const frequencyHz = 50e3;
    const clock = manualClock();
    const model = new BenchModel(new CircuitUnderTest(invertingStage([], { openLoopGain: 1e7, gbw: 1e9, slewRate }), 50), clock, 0, 1);
    // Linear output peak would be ≈ 9.5 V; SR/(2π·9.5) ≈ 8.4 kHz < 50 kHz, so it slews.
    model.setGenerator({ on: true, shape: 'sine', frequencyHz, emfAmplitudeVpk: 1, emfOffsetV: 0 });
    clock.set(1);
    const output = model.sample('output', 1, 1 / (frequencyHz * 400), 2000);
    expect(peak(output)).toBeCloseTo(slewRate / (4 * frequencyHz), 1);
    let steepest = 0;
    for (let i = 1; i < output.length; i++) steepest = Math.max(steepest, Math.abs(output[i] - output[i - 1]) * frequencyHz * 400);
    expect(steepest).toBeLessThanOrEqual(slewRate * 1.01);
  });

  it('settles after a change as e^(−t/τ) with τ = R2·C1', () => {
    const clock = manualClock();
    const circuit = new CircuitUnderTest(invertingStage([{ id: 'C1', type: 'capacitor', nodes: ['inv', 'out'], value: '100n' }]), 50);
    expect(circuit.timeConstantS).toBeCloseTo(10e3 * 100e-9, 6);
    const model = new BenchModel(circuit, clock, 0, 1);
    model.setGenerator({ on: true, shape: 'dc', frequencyHz: 1000, emfAmplitudeVpk: 0, emfOffsetV: 0 });
    clock.set(1);
    model.setGenerator({ on: true, shape: 'dc', frequencyHz: 1000, emfAmplitudeVpk: 0, emfOffsetV: 0.105 });
    const finalV = model.valueAt('output', 100);
    expect(finalV).toBeCloseTo(-1, 4); // −10 × 0.105 × 1000/1050
    const tau = circuit.timeConstantS;
    expect(model.valueAt('output', 1 + tau) / finalV).toBeCloseTo(1 - Math.exp(-1), 4);
    expect(model.valueAt('output', 1 + 7 * tau) / finalV).toBeCloseTo(1 - Math.exp(-7), 5);
  });

  it('adds white noise of the stated RMS', () => {
    const clock = manualClock();
    const model = new BenchModel(new CircuitUnderTest(invertingStage(), 50), clock, 0.01, 7);
    clock.set(1);
    const samples = model.sample('output', 1, 1e-4, 20000);
    const rms = Math.sqrt(samples.reduce((sum, v) => sum + v * v, 0) / samples.length);
    // Standard error of an RMS estimate from N Gaussian samples ≈ σ/√(2N) (statistics handbook): 0.5 % here.
    expect(rms).toBeGreaterThan(0.0098);
    expect(rms).toBeLessThan(0.0102);
  });
});
