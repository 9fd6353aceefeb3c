/**
 * Slowest time constant from the poles of the MNA pencil. Expected values:
 * first-order RC: τ = R·C (handbook formula, single real pole at −1/RC);
 * inverting low-pass with an ideal op-amp: τ = RF·CF (pole of −(RF/RN)/(1 + s·RF·CF));
 * unity-gain second-order low-pass: |p| = ω0, so 1/|p| = √(R1R2C1C2) (Sallen & Key 1955, recalled from memory).
 */
import { describe, expect, it } from 'vitest';
import { makeDesignFromTemplate, parseDesign, slowestTimeConstantS } from '../../../app/circuit';

describe('slowestTimeConstantS', () => {
  it('first-order RC: τ = RC', () => {
    const design = parseDesign({
      name: 'RC (invented)',
      input: 'in',
      output: 'out',
      parts: [
        { id: 'R1', type: 'resistor', nodes: ['in', 'out'], value: '4.7k' },
        { id: 'C1', type: 'capacitor', nodes: ['out', '0'], value: '220n' },
      ],
    });
    expect(slowestTimeConstantS(design) / (4.7e3 * 220e-9)).toBeCloseTo(1, 9);
  });

  it('inverting low-pass with an ideal op-amp: τ = RF·CF; the op-amp model moves it only slightly', () => {
    const design = parseDesign(makeDesignFromTemplate('inverting-lowpass', { rn: 1e3, rf: 33e3, cf: 10e-9 }));
    expect(slowestTimeConstantS(design, { idealOpAmps: true }) / (33e3 * 10e-9)).toBeCloseTo(1, 9);
    expect(slowestTimeConstantS(design) / (33e3 * 10e-9)).toBeCloseTo(1, 1);
  });

  it('second-order (complex pole pair): 1/|p| = √(R1R2C1C2)', () => {
    const p = { r1: 10e3, r2: 22e3, c1: 47e-9, c2: 4.7e-9 };
    const design = parseDesign(makeDesignFromTemplate('sallen-key-lowpass-unity', p));
    expect(slowestTimeConstantS(design, { idealOpAmps: true }) / Math.sqrt(p.r1 * p.r2 * p.c1 * p.c2)).toBeCloseTo(1, 8);
  });

  it('a purely resistive stage with an ideal op-amp has no time constant', () => {
    const design = parseDesign(makeDesignFromTemplate('inverting-gain'));
    expect(slowestTimeConstantS(design, { idealOpAmps: true })).toBe(0);
  });
});
