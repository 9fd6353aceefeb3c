import { describe, expect, it } from 'vitest';
import { parseEngineering, formatEngineering, formatFixed, formatPrecision, dbFromRatio, ratioFromDb, unwrapPhaseDeg, logGrid } from '../../app/units';
import { ValidationError } from '../../app/errors';

// Expected values: SI prefixes per the SI Brochure (BIPM, 9th ed., Table 7);
// "meg" for mega and "m" for milli as in SPICE netlists (common practice).
describe('engineering notation', () => {
  it.each([
    ['1k', 1e3], ['15n', 15e-9], ['4.7u', 4.7e-6], ['4.7µ', 4.7e-6], ['2meg', 2e6], ['2M', 2e6],
    ['1m', 1e-3], ['1e-3', 1e-3], ['100p', 100e-12], ['.5', 0.5], ['-3.3', -3.3], ['10 kHz', 1e4], ['1G', 1e9],
  ])('parses %s', (text, expected) => {
    expect(parseEngineering(text)).toBeCloseTo(expected, 15 - Math.round(Math.log10(Math.abs(expected))));
  });

  it.each(['', 'abc', '1x', '1..2', 'k1'])('refuses %j with a ValidationError naming the field', (text) => {
    expect(() => parseEngineering(text, 'parts[0].value')).toThrow(ValidationError);
    expect(() => parseEngineering(text, 'parts[0].value')).toThrow(/parts\[0\]\.value/);
  });

  it('formats with SI prefixes', () => {
    expect(formatEngineering(15e-9, 'F')).toBe('15 nF');
    expect(formatEngineering(1590.5, 'Hz')).toBe('1.591 kHz');
    expect(formatEngineering(0, 'V')).toBe('0 V');
  });

  // The minus sign of ISO 80000-2 (mathematical signs) is Unicode U+2212 MINUS SIGN, not the hyphen-minus U+002D.
  it('writes a negative number for people with the true minus sign, and reads it back', () => {
    expect(formatEngineering(-2e-3, 'V')).toBe('−2 mV');
    expect(formatEngineering(-Infinity, 'dB')).toBe('−Infinity dB');
    expect(formatFixed(-20.04, 1)).toBe('−20.0');
    expect(formatFixed(20.04, 1)).toBe('20.0');
    expect(formatPrecision(-0.000123456, 3)).toBe('−0.000123');
    expect(parseEngineering('−2 mV')).toBeCloseTo(-2e-3, 15);
    expect(parseEngineering(formatEngineering(-15e-9, 'F'))).toBeCloseTo(-15e-9, 20);
  });

  it('gives no sign to a value that rounds to zero (no "−0.00")', () => {
    expect(formatFixed(-0.001, 2)).toBe('0.00');
    expect(formatFixed(-0, 1)).toBe('0.0');
  });
});

describe('decibels and phase', () => {
  it('20·log10 of a voltage ratio (IEC 60027-3)', () => {
    expect(dbFromRatio(10)).toBeCloseTo(20, 12);
    expect(dbFromRatio(Math.SQRT1_2)).toBeCloseTo(-3.0103, 4);
    expect(ratioFromDb(-6.0206)).toBeCloseTo(0.5, 5);
  });

  it('unwraps a phase that crosses ±180°', () => {
    const unwrapped = unwrapPhaseDeg(Float64Array.from([170, 179, -179, -170]));
    expect(Array.from(unwrapped)).toEqual([170, 179, 181, 190]);
  });

  it('builds an inclusive log grid', () => {
    const grid = logGrid(10, 1e6, 40);
    expect(grid.length).toBe(201);
    expect(grid[0]).toBe(10);
    expect(grid[200]).toBe(1e6);
    expect(grid[40]).toBeCloseTo(100, 9);
  });
});

describe('durations', () => {
  // Expected strings: our own display convention (common practice, no source).
  it('shows tenths below 10 s, whole seconds, minutes and hours above', async () => {
    const { formatDuration } = await import('../../app/units');
    expect(formatDuration(0.44)).toBe('0.4 s');
    expect(formatDuration(44.6)).toBe('45 s');
    expect(formatDuration(185)).toBe('3 min 05 s');
    expect(formatDuration(7_800)).toBe('2 h 10 min');
    expect(formatDuration(undefined)).toBe('—');
    expect(formatDuration(-1)).toBe('—');
  });
});
