/**
 * Solver details beyond the handbook checks: op-amp loop quantities, phase
 * continuity, output limits, inductors and the DC Newton iteration.
 */
import { describe, expect, it } from 'vitest';
import {
  gainRatioFunction,
  transferFunction,
  makeDesignFromTemplate,
  maxUndistortedOutputVpk,
  parseDesign,
  solveAc,
  solveDcTransfer,
  stimulusLimitVpk,
  summarizeAc,
} from '../../../app/circuit';
import { dbFromRatio, logGrid } from '../../../app/units';

describe('op-amp loop quantities', () => {
  it('noise gain of a non-inverting stage is 1 + RF/RG and loop gain = |A|/noise gain (DEVELOPERS.md "Theory")', () => {
    const design = parseDesign(makeDesignFromTemplate('non-inverting', { rg: 1e3, rf: 4e3 }));
    const response = solveAc(design, Float64Array.from([1, 1e3, 1e5]));
    const op = response.opamps[0];
    for (let i = 0; i < 3; i++) {
      expect(op.noiseGainDb[i]).toBeCloseTo(dbFromRatio(5), 9);
      expect(op.loopGainDb[i]).toBeCloseTo(op.openLoopGainDb[i] - op.noiseGainDb[i], 9);
    }
    // |A| of the single-pole model at 1 kHz: A0/√(1 + (f·A0/GBW)²) (derived from A(s)).
    expect(op.openLoopGainDb[1]).toBeCloseTo(dbFromRatio(1e5 / Math.hypot(1, (1e3 * 1e5) / 1e6)), 9);
  });

  it('noise gain of an integrator falls to 1 (0 dB) at high frequency as CF shorts RF (common practice, no source)', () => {
    const design = parseDesign(makeDesignFromTemplate('integrator'));
    const response = solveAc(design, Float64Array.from([0.01, 1e6]));
    expect(response.opamps[0].noiseGainDb[0]).toBeCloseTo(dbFromRatio(1 + 1e6 / 10e3), 2);
    expect(response.opamps[0].noiseGainDb[1]).toBeCloseTo(0, 3);
  });

  it('a second pole adds its phase lag: A(s) = A0/((1 + s·A0/(2π·GBW))(1 + s/(2π·f2))) (macro-model definition)', () => {
    const file = makeDesignFromTemplate('non-inverting', { rg: 1e3, rf: 1e3 });
    (file.parts[2].model as Record<string, unknown>).secondPoleHz = 2e6;
    const design = parseDesign(file);
    const f = 2e6;
    const op = solveAc(design, Float64Array.from([f])).opamps[0];
    expect(op.openLoopGainDb[0]).toBeCloseTo(dbFromRatio(1e5 / Math.hypot(1, (f * 1e5) / 1e6) / Math.SQRT2), 9);
  });
});

describe('gain at one frequency per call', () => {
  it('is |H| of the inverting low-pass with the single-pole op-amp, H = −(ZF/RN)/(1 + (1 + ZF/RN)/A), ZF = RF ∥ CF, A = A0/(1 + j·f·A0/GBW) (DEVELOPERS.md "Theory"), and solveAc\'s own figure', () => {
    const design = parseDesign(makeDesignFromTemplate('inverting-lowpass', {}));
    const part = (id: string) => design.parts.find((p) => p.id === id) as unknown as { value: number; model: { openLoopGain: number; gbw: number } };
    const [rn, rf, cf] = [part('RN').value, part('RF').value, part('CF').value];
    const { openLoopGain: a0, gbw } = part('U1').model;
    const gainAt = gainRatioFunction(design);
    const frequenciesHz = [10, 1e3, 3e4, 1e6];
    const response = solveAc(design, Float64Array.from(frequenciesHz));
    frequenciesHz.forEach((f, i) => {
      // Complex arithmetic as [re, im].
      const divide = ([a, b]: number[], [c, d]: number[]) => [(a * c + b * d) / (c * c + d * d), (b * c - a * d) / (c * c + d * d)];
      const zf = divide([rf, 0], [1, 2 * Math.PI * f * rf * cf]);
      const ratio = [zf[0] / rn, zf[1] / rn];
      const openLoop = divide([a0, 0], [1, (f * a0) / gbw]);
      const noiseGainOverA = divide([1 + ratio[0], ratio[1]], openLoop);
      const h = divide(ratio, [1 + noiseGainOverA[0], noiseGainOverA[1]]);
      expect(gainAt(f) / Math.hypot(h[0], h[1])).toBeCloseTo(1, 9);
      expect(dbFromRatio(gainAt(f))).toBeCloseTo(response.gainDb[i], 10);
    });
  });
});

describe('phase', () => {
  it('is continuous through ±180° (no step above 180° between neighbours) and starts in (−180°, 180°]', () => {
    const file = makeDesignFromTemplate('sallen-key-lowpass-equal', { rf: 9e3, rg: 10e3 });
    (file.parts[6].model as Record<string, unknown>).secondPoleHz = 3e6;
    const response = solveAc(parseDesign(file), logGrid(10, 100e6, 40));
    expect(response.phaseDeg[0]).toBeGreaterThan(-180);
    expect(response.phaseDeg[0]).toBeLessThanOrEqual(180);
    for (let i = 1; i < response.phaseDeg.length; i++) expect(Math.abs(response.phaseDeg[i] - response.phaseDeg[i - 1])).toBeLessThan(180);
    // Two filter poles plus two op-amp poles: the phase ends well past −180°.
    expect(response.phaseDeg[response.phaseDeg.length - 1]).toBeLessThan(-200);
  });

  it('a second-order low-pass rolls off at −40 dB/decade well above f0 (Williams & Taylor, recalled from memory)', () => {
    const design = parseDesign(makeDesignFromTemplate('sallen-key-lowpass-unity'));
    const summary = summarizeAc(design, solveAc(design, logGrid(10, 100e3, 20), { idealOpAmps: true }));
    expect(summary.rolloffDbPerDecade).toBeCloseTo(-40, 0);
  });
});

describe('output limits', () => {
  it('full-power bandwidth: Vpk ≤ SR/(2π·f), and never above the rails (slew-rate limit of a sine, handbook formula)', () => {
    const design = parseDesign(makeDesignFromTemplate('inverting-gain', { sr: 1, rail: 10 }));
    expect(maxUndistortedOutputVpk(design, 100)).toBe(10);
    expect(maxUndistortedOutputVpk(design, 100e3)).toBeCloseTo(1e6 / (2 * Math.PI * 100e3), 12);
    // Crossover where SR/(2π·f) = 10 V.
    const crossoverHz = 1e6 / (2 * Math.PI * 10);
    expect(maxUndistortedOutputVpk(design, crossoverHz * 0.99)).toBe(10);
    expect(maxUndistortedOutputVpk(design, crossoverHz * 1.01)).toBeLessThan(10);
  });

  it('stimulus limit = output limit / |H(f)|', () => {
    const design = parseDesign(makeDesignFromTemplate('inverting-gain', { rn: 1e3, rf: 10e3, rail: 12 }));
    const gain = Math.hypot(solveAc(design, Float64Array.from([1e3])).re[0], solveAc(design, Float64Array.from([1e3])).im[0]);
    expect(stimulusLimitVpk(design, 1e3)).toBeCloseTo(12 / gain, 9);
  });
});

describe('inductors and DC', () => {
  const rl = parseDesign({
    name: 'R–L–R divider (invented)',
    input: 'in',
    output: 'out',
    parts: [
      { id: 'R1', type: 'resistor', nodes: ['in', 'a'], value: '1k' },
      { id: 'L1', type: 'inductor', nodes: ['a', 'out'], value: '100m' },
      { id: 'R2', type: 'resistor', nodes: ['out', '0'], value: '3k' },
    ],
  });

  it('an inductor is a short at DC and an open at high frequency: divider R2/(R1 + R2), corner (R1 + R2)/(2π·L)', () => {
    expect(solveDcTransfer(rl, Float64Array.from([2])).outputV[0]).toBeCloseTo(1.5, 12);
    const cornerHz = 4e3 / (2 * Math.PI * 0.1);
    const response = solveAc(rl, Float64Array.from([0.001, cornerHz]));
    expect(response.gainDb[0]).toBeCloseTo(dbFromRatio(0.75), 9);
    expect(response.gainDb[1]).toBeCloseTo(dbFromRatio(0.75) - 10 * Math.log10(2), 9);
  });

  it('Newton converges for a diode clamp driven hard, in any sweep order, and the result does not depend on the order', () => {
    const clamp = parseDesign({
      name: 'diode clamp (invented)',
      input: 'in',
      output: 'out',
      parts: [
        { id: 'R1', type: 'resistor', nodes: ['in', 'out'], value: '10' },
        { id: 'D1', type: 'diode', nodes: ['out', '0'], model: { is: 1e-15, n: 1, rs: 0.1 } },
      ],
    });
    const up = solveDcTransfer(clamp, Float64Array.from([-5, 0.1, 0.7, 100]));
    const down = solveDcTransfer(clamp, Float64Array.from([100, 0.7, 0.1, -5]));
    expect(up.outputV[0]).toBeCloseTo(-5, 6);
    for (let i = 0; i < 4; i++) expect(up.outputV[i]).toBeCloseTo(down.outputV[3 - i], 9);
    // KCL at the output for 100 V in: (100 − V)/R1 equals the Shockley current through IS, RS (Shockley 1949).
    const current = (100 - up.outputV[3]) / 10;
    const junctionV = up.outputV[3] - current * 0.1;
    expect(1e-15 * Math.expm1(junctionV / 0.0256926) / current).toBeCloseTo(1, 3);
    expect(Math.max(...up.iterations)).toBeLessThan(100);
  });

  it('offset and bias current shift a unity follower by Vos and by Ib·R (common practice, no source)', () => {
    const follower = parseDesign({
      name: 'follower with source resistance (invented)',
      input: 'in',
      output: 'out',
      parts: [
        { id: 'RS', type: 'resistor', nodes: ['in', 'p'], value: '100k' },
        { id: 'U1', type: 'opamp', nodes: ['p', 'out', 'out'], model: { openLoopGain: 1e9, gbw: 1e6, inputOffsetV: 1e-3, inputBiasA: 1e-8 } },
      ],
    });
    const out = solveDcTransfer(follower, Float64Array.from([1])).outputV[0];
    expect(out).toBeCloseTo(1 + 1e-3 - 1e-8 * 100e3, 7);
  });

  it('gives H itself, real and imaginary parts as solveAc has them, asked in any order', () => {
    const design = parseDesign(makeDesignFromTemplate('inverting-lowpass', {}));
    const transferAt = transferFunction(design);
    const frequenciesHz = [1e6, 10, 3e4, 1e3];
    const response = solveAc(design, Float64Array.from(frequenciesHz));
    frequenciesHz.forEach((f, i) => {
      const h = transferAt(f);
      expect(h.re).toBe(response.re[i]);
      expect(h.im).toBe(response.im[i]);
    });
  });
});
