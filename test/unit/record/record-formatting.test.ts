import { describe, expect, it } from 'vitest';
import { PointFlag } from '../../../app/contract/contract';
import { flagWords, formatHz, formatMeasured, idnText, verdictHeadline } from '../../../app/record/record-formatting';
import { logAxis, linearAxis, axisFraction } from '../../../app/record/plot-axes';

describe('record wording and number formats', () => {
  it('names every flag bit and keeps unknown bits visible', () => {
    expect(flagWords(PointFlag.distorted | PointFlag.outsideToleranceBand)).toBe('distorted; outside tolerance band');
    expect(flagWords(0)).toBe('');
    expect(flagWords(PointFlag.pastGainLimit | 1024)).toBe('past gain limit; unknown flags 1024');
  });

  it('*IDN? reply is the four IEEE 488.2 §10.14 fields joined by commas', () => {
    expect(idnText({ manufacturer: 'M', model: 'X', serialNumber: 'S1', firmware: '1.0' })).toBe('M,X,S1,1.0');
  });

  it('a point\'s gain and phase are rounded with their uncertainty (GUM JCGM 100:2008 §7.2.6), dB and ° without SI prefixes', () => {
    expect(formatMeasured(19.960123, 0.0000591, 'dB')).toBe('(19.960123 ± 0.000059) dB');
    expect(formatMeasured(-90.1234, 0.345, '°')).toBe('(−90.12 ± 0.35)°');
    expect(formatMeasured(0.0004321, 0.0000123, 'dB')).toBe('(0.000432 ± 0.000012) dB');
    expect(formatMeasured(19.96, null, 'dB')).toBe('19.960 dB');
  });

  it('a frequency that rounds up to the next prefix moves to it (999.96 kHz → 1 MHz; common practice, no source)', () => {
    expect(formatHz(999.96e3)).toBe('1 MHz');
    expect(formatHz(999.9e3)).toBe('999.9 kHz');
  });

  it('a missing verdict is said plainly', () => {
    expect(verdictHeadline(null)).toMatch(/NO VERDICT/);
    expect(verdictHeadline({ pass: false, reasons: [] })).toBe('FAIL');
  });
});

describe('plot axes', () => {
  it('log axis spans whole decades with majors at each decade and minors at 2…9 (common practice for Bode plots)', () => {
    const axis = logAxis([15, 2e5], 'Frequency (Hz)', 'Hz');
    expect([axis.min, axis.max]).toEqual([10, 1e6]);
    expect(axis.ticks.filter((t) => t.major).map((t) => t.label)).toEqual(['10 Hz', '100 Hz', '1 kHz', '10 kHz', '100 kHz', '1 MHz']);
    expect(axis.ticks.filter((t) => !t.major)).toHaveLength(5 * 8);
    // log10(1000/10) / log10(1e6/10) = 2/5 (definition of a log scale).
    expect(axisFraction(axis, 1000)).toBeCloseTo(0.4, 12);
    expect(axisFraction(axis, 0)).toBeNaN();
  });

  it('linear axis uses 1-2-5 steps and covers the data', () => {
    const axis = linearAxis([-43.2, 20.1], 'Gain (dB)', '');
    expect(axis.min).toBeLessThanOrEqual(-43.2);
    expect(axis.max).toBeGreaterThanOrEqual(20.1);
    const step = axis.ticks[1].value - axis.ticks[0].value;
    expect([1, 2, 5, 10, 20, 50]).toContain(step);
    expect(axisFraction(axis, axis.min)).toBe(0);
    expect(axisFraction(axis, axis.max)).toBe(1);
  });
});
