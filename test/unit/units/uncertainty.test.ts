/** Value and uncertainty rounded together: GUM, JCGM 100:2008 §7.2.6 (two significant digits) and §7.2.2 (the form). */
import { describe, expect, it } from 'vitest';
import { formatWithUncertainty } from '../../../app/units';

describe('formatWithUncertainty (JCGM 100:2008 §7.2.6)', () => {
  it('writes the GUM\'s own example of §7.2.2: 100.021 47 g with u = 0.35 mg', () => {
    expect(formatWithUncertainty(100.02147, 0.00035, 'g')).toBe('(100.02147 ± 0.00035) g');
  });

  it('rounds the uncertainty to two significant digits and the value to the same decimal place', () => {
    // 175.4 Hz → 180 Hz (tens place), so the value is rounded to tens of hertz.
    expect(formatWithUncertainty(1_000_175.4, 175.4, 'Hz')).toBe('(1.00018 ± 0.00018) MHz');
    expect(formatWithUncertainty(20.004321, 0.0123, 'dB')).toBe('(20.004 ± 0.012) dB');
  });

  it('carries a rounded-up uncertainty into the next place (0.0996 → 0.10)', () => {
    expect(formatWithUncertainty(5, 0.0996, 'V')).toBe('(5.00 ± 0.10) V');
  });

  it('keeps dB and degrees unprefixed when asked: the GUM example in its own unit, a small gain in dB, a phase with the degree sign unspaced (SI Brochure §5.4.3)', () => {
    expect(formatWithUncertainty(100.02147, 0.00035, 'g', { prefix: false })).toBe('(100.02147 ± 0.00035) g');
    expect(formatWithUncertainty(0.0004321, 0.0000123, 'dB', { prefix: false })).toBe('(0.000432 ± 0.000012) dB');
    expect(formatWithUncertainty(-45.678, 1.26, '°', { prefix: false })).toBe('(−45.7 ± 1.3)°');
  });

  it('writes a negative value with the true minus sign', () => {
    expect(formatWithUncertainty(-3.01234, 0.012, 'dB')).toBe('(−3.012 ± 0.012) dB');
  });

  it('without a usable uncertainty writes the value alone', () => {
    expect(formatWithUncertainty(1500, Number.NaN, 'Hz')).toBe('1.5 kHz');
    expect(formatWithUncertainty(1500, 0, 'Hz')).toBe('1.5 kHz');
  });
});
