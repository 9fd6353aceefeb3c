/**
 * The simulated bench's circuit noise. Expected values: the synthesized record's
 * variance equals the integral of its density over the band (Parseval's theorem,
 * one-sided density: σ² = ∫₀^{fs/2} S df); the Welch estimate of the simulated
 * output follows the theory engine's density (solveNoise) bin by bin within the
 * Welch estimate's own 95 % interval (Percival & Walden eq. 292b, as in
 * app/signal/welch.ts); flat noise alone would not (the stage's density falls by
 * a factor of ~10 over the band checked, from its feedback pole).
 */
import { describe, expect, it } from 'vitest';
import { BenchModel } from '../../../app/sim/bench-model';
import { CircuitUnderTest } from '../../../app/sim/circuit-under-test';
import type { BenchClock } from '../../../app/bench';
import { parseDesign, solveNoise } from '../../../app/circuit';
import { shapedNoiseRecord, welchPsd } from '../../../app/signal';
import { SeededRandom } from '../../../app/numeric';
import { covers, expectCoverage, scaledInterval } from '../../helpers/coverage';

const stillClock: BenchClock = { timeScale: 1, nowS: () => 0, sleepS: async () => undefined };

const noisyStage = parseDesign({
  name: 'inverting ×−100 with a 1.6 kHz feedback pole (invented)',
  input: 'in',
  output: 'out',
  parts: [
    { id: 'R1', type: 'resistor', nodes: ['in', 'inv'], value: '1k' },
    { id: 'R2', type: 'resistor', nodes: ['inv', 'out'], value: '100k' },
    { id: 'C1', type: 'capacitor', nodes: ['inv', 'out'], value: '1n' },
    { id: 'U1', type: 'opamp', nodes: ['0', 'inv', 'out'], model: { openLoopGain: 1e5, gbw: 10e6, voltageNoiseVPerRtHz: 10e-9, currentNoiseAPerRtHz: 1e-12, voltageNoiseCornerHz: 100 } },
  ],
});

describe('shapedNoiseRecord', () => {
  it('has the variance of its density integrated over the band (Parseval)', () => {
    const random = new SeededRandom(7);
    const fs = 1e5;
    const density = (f: number) => 1e-6 / Math.sqrt(1 + (f / 5e3) ** 2);
    const record = shapedNoiseRecord({ length: 1 << 16, sampleRateHz: fs, densityVPerRtHz: density, gaussian: () => random.nextGaussian() });
    let variance = 0;
    for (const v of record) variance += (v * v) / record.length;
    // ∫₀^{fs/2} S0²/(1+(f/fc)²) df = S0²·fc·atan(fs/(2fc)) (a standard integral).
    const expected = 1e-12 * 5e3 * Math.atan(fs / 2 / 5e3);
    // 2^15 independent bins of two χ²₁ parts each: relative standard error of the variance ≲ 1/√(2^15) ≈ 0.6 %; allow 3 %.
    expect(Math.abs(variance / expected - 1)).toBeLessThan(0.03);
  });

  it('refuses a length that is not a power of two', () => {
    expect(() => shapedNoiseRecord({ length: 1000, sampleRateHz: 1, densityVPerRtHz: () => 1, gaussian: () => 0 })).toThrow(/power of two/);
  });
});

describe('BenchModel circuit noise', () => {
  it('puts the theory engine\'s output density on the output, shaped by the circuit', () => {
    const circuit = new CircuitUnderTest(noisyStage, 50);
    const model = new BenchModel(circuit, stillClock, 0, 3, true);
    const intervalS = 1e-5;
    const points = 16384;
    const records = 12;
    const samples = new Float64Array(points * records);
    // Records back to back, as a scope taking several records would read them (generator off: the signal is 0).
    for (let r = 0; r < records; r++) samples.set(model.sample('output', r * points * intervalS, intervalS, points), r * points);
    const estimate = welchPsd(samples, 1 / intervalS, { segmentLength: 2048 });
    const theory = solveNoise(circuit.toOutput, estimate.frequencyHz.subarray(1, -1)).outputVPerRtHz;
    const covered = { stated: 0, widened: 0, narrowed: 0 };
    let bins = 0;
    // Every second bin: Hann leakage correlates neighbours, bins two apart only by (1/6)² (Heinzel et al. 2002).
    for (let b = 2; b < estimate.frequencyHz.length - 1; b += 2) {
      const f = estimate.frequencyHz[b];
      if (f < 300 || f > 40e3) continue;
      const ratio = estimate.psdV2PerHz[b] / theory[b - 1] ** 2;
      const interval = estimate.psdInterval95.map((factor) => factor * ratio) as [number, number];
      bins++;
      if (covers(interval, 1)) covered.stated++;
      if (covers(scaledInterval(interval, ratio, 2, 'log'), 1)) covered.widened++;
      if (covers(scaledInterval(interval, ratio, 0.5, 'log'), 1)) covered.narrowed++;
    }
    expect(bins).toBeGreaterThan(400);
    // 95 % intervals: 95 % of the bins hold the true density, ± 4 binomial standard errors (±4.3 % over ~400 bins);
    // the same intervals twice or half as wide (log scale) are caught.
    const [low, high] = expectCoverage(covered.stated, bins, 0.95, 'circuit noise density in the Welch interval');
    expect(covered.widened / bins).toBeGreaterThan(high);
    expect(covered.narrowed / bins).toBeLessThan(low);
    // The density is not flat: it falls by far more than the estimate's spread across the band.
    const at = (f: number) => solveNoise(circuit.toOutput, Float64Array.of(f)).outputVPerRtHz[0];
    expect(at(300) / at(40e3)).toBeGreaterThan(10);
    expect(model.circuitNoise?.densityAt(1000)).toBeCloseTo(at(1000), 15);
  });

  it('leaves the input node and a bench without circuit noise alone', () => {
    const circuit = new CircuitUnderTest(noisyStage, 50);
    expect(new BenchModel(circuit, stillClock, 0, 3, true).sample('input', 0, 1e-5, 64).every((v) => v === 0)).toBe(true);
    expect(new BenchModel(circuit, stillClock, 0, 3).sample('output', 0, 1e-5, 64).every((v) => v === 0)).toBe(true);
  });

  it('adds the circuit noise to the meter\'s samples too', () => {
    const circuit = new CircuitUnderTest(noisyStage, 50);
    const model = new BenchModel(circuit, stillClock, 0, 3, true);
    const samples = model.sampleStratified('output', 0, 0.1, 20000);
    let variance = 0;
    for (const v of samples) variance += (v * v) / samples.length;
    // On the meter's 1 µs grid the band is 0…500 kHz: σ² = ∫ S df (Parseval), integrated here on a fine log grid by the trapezoid rule.
    const grid = Array.from({ length: 2001 }, (_, i) => 10 ** (-0.5 + (i * 6.2) / 2000));
    const density = solveNoise(circuit.toOutput, Float64Array.from(grid.filter((f) => f <= 5e5))).outputVPerRtHz;
    let integral = 0;
    for (let i = 1; i < density.length; i++) integral += ((density[i] ** 2 + density[i - 1] ** 2) / 2) * (grid[i] - grid[i - 1]);
    expect(Math.abs(Math.sqrt(variance / integral) - 1)).toBeLessThan(0.1);
  });
});
