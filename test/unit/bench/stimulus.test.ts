/**
 * Amplitude conversions. Sources: sine RMS = peak/√2, so Vpp = 2√2·Vrms
 * (handbook formula for a sinusoid); voltage divider V_load = V·R_L/(R_L+R_S)
 * (Ohm's law); generator amplitude calibrated into a matched 50 Ω load
 * means EMF = 2 × display (common practice for bench generators).
 */
import { describe, expect, it } from 'vitest';
import { openCircuitFactor, voltageIntoLoad, vppFromVrms, vrmsFromVpp, worstCaseStimulusVpp } from '../../../app/bench';
import { fillTemplate, formatScpiNumber, isQuery } from '../../../app/bench';

describe('stimulus conversions', () => {
  it('Vpp ↔ Vrms for a sine (Vpp = 2√2·Vrms, handbook formula)', () => {
    expect(vppFromVrms(1)).toBeCloseTo(2.8284271247, 9);
    expect(vrmsFromVpp(2.8284271247461903)).toBeCloseTo(1, 12);
  });

  it('a matched 50 Ω load halves the EMF (divider formula)', () => {
    expect(voltageIntoLoad(2, 50, 50)).toBe(1);
    expect(voltageIntoLoad(1, 1000, 50)).toBeCloseTo(1000 / 1050, 12);
    expect(voltageIntoLoad(1, Infinity, 50)).toBe(1);
    expect(openCircuitFactor('50-ohm')).toBe(2);
    expect(openCircuitFactor('high-z')).toBe(1);
  });

  it('worst-case stimulus counts |offset| as peak and the open-circuit doubling (our documented rule)', () => {
    expect(worstCaseStimulusVpp(1, 0, 'high-z')).toBe(1);
    expect(worstCaseStimulusVpp(1, -0.5, 'high-z')).toBe(2);
    expect(worstCaseStimulusVpp(1, 0.25, '50-ohm')).toBe(3);
  });
});

describe('templates', () => {
  it('fill placeholders with SCPI decimal numbers that round-trip (IEEE 488.2 §7.7.2, recalled)', () => {
    expect(fillTemplate('SOURce:FREQuency {frequencyHz}', { frequencyHz: 1234.5 })).toBe('SOURce:FREQuency 1234.5');
    expect(Number(formatScpiNumber(1 / 3))).toBeCloseTo(1 / 3, 11);
    expect(formatScpiNumber(1e-7)).toBe('1e-7');
    expect(() => formatScpiNumber(Number.NaN)).toThrow();
  });
  it('recognise queries by a header ending in "?"', () => {
    expect(isQuery('MEASure:VPP? CHANnel1')).toBe(true);
    expect(isQuery('SOURce:FUNCtion "A?B"')).toBe(false);
  });
});
