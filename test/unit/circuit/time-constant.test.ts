/**
 * Poles and the slowest time constant from the MNA pencil. Expected values:
 * - first-order RC: one real pole at −1/RC, τ = RC (handbook formula);
 * - inverting low-pass with an ideal op-amp: pole of −(RF/RN)/(1 + s·RF·CF), τ = RF·CF;
 * - second-order sections s² + s·ω0/Q + ω0²: poles at −ω0/(2Q) ± jω0·√(1 − 1/(4Q²)),
 *   so |s| = ω0 and the envelope decays with τ = 2Q/ω0; f0 and Q of the templates
 *   from Sallen & Key (1955) and Williams & Taylor (recalled from memory), as in
 *   handbook-formulas.test.ts;
 * - equal-component Sallen–Key with K > 3 has Q < 0: right-half-plane poles, never settles.
 */
import { describe, expect, it } from 'vitest';
import { circuitPoles, makeDesignFromTemplate, parseDesign, slowestTimeConstantS } from '../../../app/circuit';

describe('circuit poles and slowest time constant', () => {
  it('first-order RC: one pole at −1/RC, τ = RC', () => {
    const design = parseDesign({
      name: 'RC (invented)',
      input: 'in',
      output: 'out',
      parts: [
        { id: 'R1', type: 'resistor', nodes: ['in', 'out'], value: '4.7k' },
        { id: 'C1', type: 'capacitor', nodes: ['out', '0'], value: '220n' },
      ],
    });
    const poles = circuitPoles(design);
    expect(poles.re).toHaveLength(1);
    expect(poles.re[0] * 4.7e3 * 220e-9).toBeCloseTo(-1, 12);
    expect(slowestTimeConstantS(design) / (4.7e3 * 220e-9)).toBeCloseTo(1, 12);
  });

  it('inverting low-pass with an ideal op-amp: τ = RF·CF; the op-amp model moves it only slightly', () => {
    const design = parseDesign(makeDesignFromTemplate('inverting-lowpass', { rn: 1e3, rf: 33e3, cf: 10e-9 }));
    expect(slowestTimeConstantS(design, { idealOpAmps: true }) / (33e3 * 10e-9)).toBeCloseTo(1, 9);
    expect(slowestTimeConstantS(design) / (33e3 * 10e-9)).toBeCloseTo(1, 1);
  });

  it('unity-gain second-order low-pass: |s| = ω0, Re s = −ω0/(2Q), τ = 2Q/ω0', () => {
    const p = { r1: 10e3, r2: 22e3, c1: 47e-9, c2: 4.7e-9 };
    const root = Math.sqrt(p.r1 * p.r2 * p.c1 * p.c2);
    const w0 = 1 / root;
    const q = root / (p.c2 * (p.r1 + p.r2));
    const design = parseDesign(makeDesignFromTemplate('sallen-key-lowpass-unity', p));
    const poles = circuitPoles(design, { idealOpAmps: true });
    expect(poles.re).toHaveLength(2);
    for (let i = 0; i < 2; i++) {
      expect(Math.hypot(poles.re[i], poles.im[i]) / w0).toBeCloseTo(1, 9);
      expect(poles.re[i] / (-w0 / (2 * q))).toBeCloseTo(1, 9);
    }
    expect(Math.abs(poles.im[0])).toBeGreaterThan(0);
    expect(slowestTimeConstantS(design, { idealOpAmps: true }) / ((2 * q) / w0)).toBeCloseTo(1, 9);
  });

  it('multiple-feedback band-pass, Q ≈ 5: the envelope, not 1/ω0, sets the settling time', () => {
    const p = { r1: 80e3, r2: 1.6e3, r3: 160e3, c1: 10e-9, c2: 10e-9 };
    const w0 = Math.sqrt((p.r1 + p.r2) / (p.r1 * p.r2 * p.r3 * p.c1 * p.c2));
    const q = (w0 * p.r3 * p.c1 * p.c2) / (p.c1 + p.c2);
    const design = parseDesign(makeDesignFromTemplate('mfb-bandpass', p));
    expect(slowestTimeConstantS(design, { idealOpAmps: true }) / ((2 * q) / w0)).toBeCloseTo(1, 9);
    expect(slowestTimeConstantS(design, { idealOpAmps: true }) * w0).toBeGreaterThan(9);
  });

  it('a purely resistive stage with an ideal op-amp has no time constant', () => {
    const design = parseDesign(makeDesignFromTemplate('inverting-gain'));
    expect(slowestTimeConstantS(design, { idealOpAmps: true })).toBe(0);
  });

  it('an unstable stage (equal-component Sallen–Key with K = 3.5) never settles: Infinity', () => {
    const design = parseDesign(makeDesignFromTemplate('sallen-key-lowpass-equal', { rg: 10e3, rf: 25e3 }));
    const poles = circuitPoles(design, { idealOpAmps: true });
    expect(Math.max(...poles.re)).toBeGreaterThan(0);
    expect(slowestTimeConstantS(design, { idealOpAmps: true })).toBe(Infinity);
  });
});
