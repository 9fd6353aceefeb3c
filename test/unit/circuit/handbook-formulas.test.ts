/**
 * The solver against closed-form results. Sources of the expected values:
 * - [WT] A. B. Williams, F. J. Taylor, "Electronic Filter Design Handbook",
 *   McGraw-Hill: first-order corner, second-order low-/high-/band-pass forms
 *   H = H0·ω0²/(s² + s·ω0/Q + ω0²) etc. (recalled from memory).
 * - [SK] R. P. Sallen, E. L. Key, "A Practical Method of Designing RC Active
 *   Filters", IRE Trans. Circuit Theory CT-2 (1955): the unity-gain and
 *   equal-component f0 and Q (recalled from memory; re-derived by nodal analysis).
 * - [GTH] J. G. Graeme, G. E. Tobey, L. P. Huelsman, "Operational Amplifiers:
 *   Design and Applications" (1971): inverting gain −RF/RN, non-inverting gain
 *   1 + RF/RG, closed-loop bandwidth ≈ GBW/noise gain, finite-gain error
 *   H = Hideal/(1 + NG/A) (recalled from memory; also DEVELOPERS.md "Theory").
 * - [SH] W. Shockley (1949): diode law I = IS·(exp(V/(n·VT)) − 1), giving the
 *   log-stage slope n·VT·ln 10 per decade of input current.
 * - [CODATA] CODATA 2018 / SI 2019: k = 1.380649e-23 J/K, q = 1.602176634e-19 C (exact).
 */
import { describe, expect, it } from 'vitest';
import {
  logStageIdeal,
  makeDesignFromTemplate,
  parseDesign,
  solveAc,
  solveDcTransfer,
  summarizeAc,
  thermalVoltageV,
  type Design,
} from '../../../app/circuit';
import { dbFromRatio, logGrid } from '../../../app/units';

const TWO_PI = 2 * Math.PI;

function design(id: string, params: Record<string, number> = {}): Design {
  return parseDesign(makeDesignFromTemplate(id, params), id);
}

/** Gain (dB) and phase (°) at single frequencies. */
function at(d: Design, frequenciesHz: number[], idealOpAmps = true) {
  const r = solveAc(d, Float64Array.from(frequenciesHz), { idealOpAmps });
  return { gainDb: Array.from(r.gainDb), phaseDeg: Array.from(r.phaseDeg), re: Array.from(r.re), im: Array.from(r.im) };
}

describe('first-order stages', () => {
  it('corner of the inverting low-pass is 1/(2π·RF·CF), where the gain is 3.01 dB down and the phase 45° off [WT]', () => {
    const rf = 22e3;
    const cf = 4.7e-9;
    const rn = 2.2e3;
    const cornerHz = 1 / (TWO_PI * rf * cf);
    const r = at(design('inverting-lowpass', { rn, rf, cf }), [cornerHz]);
    expect(r.gainDb[0]).toBeCloseTo(dbFromRatio(rf / rn) - 10 * Math.log10(2), 9);
    expect(r.phaseDeg[0]).toBeCloseTo(180 - 45, 9);
  });

  it('corner of the inverting high-pass is 1/(2π·RN·CN) [WT]', () => {
    const rn = 4.7e3;
    const cn = 33e-9;
    const rf = 47e3;
    const cornerHz = 1 / (TWO_PI * rn * cn);
    const r = at(design('inverting-highpass', { rn, cn, rf }), [cornerHz]);
    expect(r.gainDb[0]).toBeCloseTo(dbFromRatio(rf / rn) - 10 * Math.log10(2), 9);
    expect(r.phaseDeg[0]).toBeCloseTo(-180 + 45 + 360 * Math.round((r.phaseDeg[0] + 135) / 360), 9);
  });

  it('inverting gain is −RF/RN with an ideal op-amp [GTH]', () => {
    const r = at(design('inverting-gain', { rn: 3.3e3, rf: 47e3 }), [1e3]);
    expect(r.re[0]).toBeCloseTo(-47e3 / 3.3e3, 10);
    expect(Math.abs(r.im[0])).toBeLessThan(1e-12);
  });

  it('with finite A0 the inverting gain is (RF/RN)/(1 + (1 + RF/RN)/A0) at low frequency [GTH, DEVELOPERS.md "Theory"]', () => {
    const a0 = 2e4;
    const r = at(design('inverting-gain', { rn: 1e3, rf: 100e3, a0 }), [0.01], false);
    const expected = 100 / (1 + 101 / a0);
    expect(Math.hypot(r.re[0], r.im[0])).toBeCloseTo(expected, 6);
  });

  it('non-inverting gain is 1 + RF/RG [GTH]', () => {
    const r = at(design('non-inverting', { rg: 2.2e3, rf: 39e3 }), [500]);
    expect(r.re[0]).toBeCloseTo(1 + 39e3 / 2.2e3, 10);
  });

  it('closed-loop −3 dB bandwidth ≈ GBW / noise gain (within 1 % for NG = 10, A0 = 1e5) [GTH]', () => {
    const d = design('non-inverting', { rg: 1e3, rf: 9e3, gbw: 2e6 });
    const response = solveAc(d, logGrid(10, 10e6, 20));
    const summary = summarizeAc(d, response);
    expect(summary.minus3dbHz).toHaveLength(1);
    expect(summary.minus3dbHz[0] / (2e6 / 10)).toBeGreaterThan(0.99);
    expect(summary.minus3dbHz[0] / (2e6 / 10)).toBeLessThan(1.01);
  });

  it('gain-limit point: |A(f)| = noise gain, i.e. f = (GBW/A0)·√((A0/NG)² − 1) for a single pole [GTH, derived from A(s)]', () => {
    const a0 = 1e5;
    const gbw = 1e6;
    const d = design('inverting-gain', { rn: 1e3, rf: 49e3, a0, gbw });
    const response = solveAc(d, logGrid(10, 1e6, 10));
    const noiseGain = 50;
    const expectedHz = (gbw / a0) * Math.sqrt((a0 / noiseGain) ** 2 - 1);
    expect(response.opamps[0].gainLimitHz! / expectedHz).toBeCloseTo(1, 9);
    expect(response.opamps[0].noiseGainDb[0]).toBeCloseTo(dbFromRatio(noiseGain), 6);
    expect(summarizeAc(d, response).gainLimitHz).toBe(response.opamps[0].gainLimitHz);
  });

  it('practical integrator: unity gain at 1/(2π·RN·CF) well above the RF·CF corner [WT]', () => {
    const rn = 10e3;
    const cf = 10e-9;
    const unityHz = 1 / (TWO_PI * rn * cf);
    const r = at(design('integrator', { rn, cf, rf: 100e6 }), [unityHz]);
    expect(r.gainDb[0]).toBeCloseTo(0, 4);
  });
});

describe('second-order templates: f0 and Q', () => {
  // For H = K·ω0²/(s² + s·ω0/Q + ω0²) the gain at ω0 is K·Q with phase −90° (low-pass), +90° (high-pass) [WT].
  it('unity-gain low-pass: f0 = 1/(2π√(R1R2C1C2)), Q = √(R1R2C1C2)/(C2(R1+R2)) [SK]', () => {
    const p = { r1: 12e3, r2: 8.2e3, c1: 33e-9, c2: 6.8e-9 };
    const root = Math.sqrt(p.r1 * p.r2 * p.c1 * p.c2);
    const f0 = 1 / (TWO_PI * root);
    const q = root / (p.c2 * (p.r1 + p.r2));
    const r = at(design('sallen-key-lowpass-unity', p), [f0]);
    expect(r.gainDb[0]).toBeCloseTo(dbFromRatio(q), 8);
    expect(r.phaseDeg[0]).toBeCloseTo(-90, 7);
  });

  it('unity-gain high-pass: f0 = 1/(2π√(R1R2C1C2)), Q = √(R1R2C1C2)/(R1(C1+C2)) [SK]', () => {
    const p = { c1: 10e-9, c2: 22e-9, r1: 6.8e3, r2: 27e3 };
    const root = Math.sqrt(p.r1 * p.r2 * p.c1 * p.c2);
    const f0 = 1 / (TWO_PI * root);
    const q = root / (p.r1 * (p.c1 + p.c2));
    const r = at(design('sallen-key-highpass-unity', p), [f0]);
    expect(r.gainDb[0]).toBeCloseTo(dbFromRatio(q), 8);
    expect(r.phaseDeg[0]).toBeCloseTo(90, 7);
  });

  it.each([
    ['sallen-key-lowpass-equal', -90],
    ['sallen-key-highpass-equal', 90],
  ])('%s: f0 = 1/(2π·R·C), Q = 1/(3 − K), K = 1 + RF/RG [SK]', (id, phaseDeg) => {
    const p = { r: 15e3, c: 4.7e-9, rg: 10e3, rf: 12e3 };
    const k = 1 + p.rf / p.rg;
    const f0 = 1 / (TWO_PI * p.r * p.c);
    const r = at(design(id as string, p), [f0]);
    expect(r.gainDb[0]).toBeCloseTo(dbFromRatio(k / (3 - k)), 8);
    expect(r.phaseDeg[0]).toBeCloseTo(phaseDeg as number, 7);
  });

  it('multiple-feedback band-pass: f0, Q and centre gain, half-power points at f0(√(1 + 1/4Q²) ± 1/2Q) [WT]', () => {
    const p = { r1: 68e3, r2: 2.2e3, r3: 150e3, c1: 10e-9, c2: 15e-9 };
    const w0 = Math.sqrt((p.r1 + p.r2) / (p.r1 * p.r2 * p.r3 * p.c1 * p.c2));
    const f0 = w0 / TWO_PI;
    const q = (w0 * p.r3 * p.c1 * p.c2) / (p.c1 + p.c2);
    const centreGain = (p.r3 * p.c1) / (p.r1 * (p.c1 + p.c2));
    const lowHz = f0 * (Math.sqrt(1 + 1 / (4 * q * q)) - 1 / (2 * q));
    const highHz = f0 * (Math.sqrt(1 + 1 / (4 * q * q)) + 1 / (2 * q));
    const r = at(design('mfb-bandpass', p), [f0, lowHz, highHz]);
    expect(r.gainDb[0]).toBeCloseTo(dbFromRatio(centreGain), 8);
    expect(Math.abs(r.phaseDeg[0])).toBeCloseTo(180, 7);
    expect(r.gainDb[1]).toBeCloseTo(dbFromRatio(centreGain) - 10 * Math.log10(2), 8);
    expect(r.gainDb[2]).toBeCloseTo(dbFromRatio(centreGain) - 10 * Math.log10(2), 8);
    // The summary finds the same half-power points from a sweep.
    const d = design('mfb-bandpass', p);
    const summary = summarizeAc(d, solveAc(d, logGrid(10, 1e5, 20), { idealOpAmps: true }));
    expect(summary.minus3dbHz[0] / lowHz).toBeCloseTo(1, 6);
    expect(summary.minus3dbHz[1] / highHz).toBeCloseTo(1, 6);
  });
});

describe('log stage and thermal voltage', () => {
  it('VT = k·T/q with the exact CODATA 2018 constants: 25.6926 mV at 25 °C [CODATA]', () => {
    expect(thermalVoltageV(25)).toBeCloseTo((1.380649e-23 * 298.15) / 1.602176634e-19, 15);
    expect(thermalVoltageV(25)).toBeCloseTo(0.0256926, 6);
  });

  it('slope is n·VT·ln(10) per decade of input [SH]', () => {
    const n = 1.7;
    const temperatureC = 40;
    const file = makeDesignFromTemplate('log-stage', { n, r1: 10e3 });
    file.temperatureC = temperatureC;
    (file.parts[2].model as Record<string, unknown>).ideal = true;
    const d = parseDesign(file, 'log-stage');
    const out = solveDcTransfer(d, Float64Array.from([0.01, 0.1, 1]));
    const slopeV = n * thermalVoltageV(temperatureC) * Math.log(10);
    // 0.1 µV: the solver keeps SPICE's GMIN (1e-12 S) across the junction, which the formula lacks.
    expect(Math.abs(out.outputV[0] - out.outputV[1] - slopeV)).toBeLessThan(1e-7);
    expect(Math.abs(out.outputV[1] - out.outputV[2] - slopeV)).toBeLessThan(1e-7);
  });

  it('the DC solver with an ideal op-amp matches −(n·VT·ln(I/IS + 1) + I·RS) [SH, DEVELOPERS.md "Theory"]', () => {
    const diode = { is: 3e-12, n: 1.3, rs: 4 };
    const file = makeDesignFromTemplate('log-stage', { ...diode, r1: 4.7e3 });
    (file.parts[2].model as Record<string, unknown>).ideal = true;
    const d = parseDesign(file, 'log-stage');
    const inputs = logGrid(1e-3, 10, 3);
    const out = solveDcTransfer(d, inputs);
    // 1 µV: GMIN (1e-12 S) across the junction carries ~1e-6 of the 1 mV input current.
    for (let i = 0; i < inputs.length; i++) expect(Math.abs(out.outputV[i] - logStageIdeal(inputs[i], 4.7e3, diode, 25))).toBeLessThan(1e-6);
  });
});
