/**
 * Numeric replies. Sources: IEEE 488.2 §8.7.2–8.7.4 (NR1, NR2, NR3 forms);
 * SCPI-1999 Vol. 1 §7.2.1.4/§7.2.1.5: 9.9E37 is infinity (overrange, −9.9E37
 * negative), 9.91E37 is not-a-number — clause numbers recalled from memory.
 */
import { describe, expect, it } from 'vitest';
import { parseReading, parseErrorEntry, parseIdentity, ScpiMalformedReplyError } from '../../../app/scpi';

describe('parseReading', () => {
  it('reads NR1, NR2 and NR3 forms (IEEE 488.2 §8.7.2–8.7.4)', () => {
    expect(parseReading('42', 'Q?')).toEqual({ value: 42, flag: 'ok' });
    expect(parseReading('-0.125', 'Q?')).toEqual({ value: -0.125, flag: 'ok' });
    expect(parseReading('+1.23456789E-01', 'Q?')).toEqual({ value: 0.123456789, flag: 'ok' });
    expect(parseReading(' 1e3 ', 'Q?')).toEqual({ value: 1000, flag: 'ok' });
  });

  it('flags 9.9E37 (either sign, any digit count) as overrange with no usable value (SCPI-1999 §7.2.1.4, recalled)', () => {
    for (const text of ['9.9E37', '+9.90000000E+37', '-9.9E+37', '9.900E37']) {
      const reading = parseReading(text, 'READ?');
      expect(reading.flag).toBe('overrange');
      expect(Number.isNaN(reading.value)).toBe(true);
    }
  });

  it('flags 9.91E37 as not-a-number (SCPI-1999 §7.2.1.5, recalled)', () => {
    const reading = parseReading('+9.91000000E+37', 'READ?');
    expect(reading.flag).toBe('nan');
    expect(Number.isNaN(reading.value)).toBe(true);
  });

  it('keeps ordinary large values that are not the reserved ones', () => {
    expect(parseReading('9.8E37', 'Q?').flag).toBe('ok');
  });

  it('refuses text that is not a decimal number, naming the query', () => {
    expect(() => parseReading('ON', 'OUTP?')).toThrow(ScpiMalformedReplyError);
    expect(() => parseReading('1.2.3', 'READ?')).toThrow(/READ\?/);
    expect(() => parseReading('', 'READ?')).toThrow(ScpiMalformedReplyError);
  });
});

describe('parseErrorEntry (SCPI-1999 SYSTem:ERRor? reply form, recalled from memory)', () => {
  it('reads code and message, including doubled quotes', () => {
    expect(parseErrorEntry('-113,"Undefined header"')).toEqual({ code: -113, message: 'Undefined header' });
    expect(parseErrorEntry('0,"No error"')).toEqual({ code: 0, message: 'No error' });
    expect(parseErrorEntry('-222,"Data out of range; ""FREQ"""')).toEqual({ code: -222, message: 'Data out of range; "FREQ"' });
  });
  it('refuses anything else', () => {
    expect(() => parseErrorEntry('garbage')).toThrow(ScpiMalformedReplyError);
  });
});

describe('parseIdentity (*IDN? four fields, IEEE 488.2 §10.14, recalled)', () => {
  it('splits manufacturer, model, serial number, firmware', () => {
    expect(parseIdentity('Invented Maker,Model 1,SN123,1.0\n')).toEqual({ manufacturer: 'Invented Maker', model: 'Model 1', serialNumber: 'SN123', firmware: '1.0' });
  });
  it('refuses a reply without four fields', () => {
    expect(() => parseIdentity('just text')).toThrow(ScpiMalformedReplyError);
    expect(() => parseIdentity('a,b,c,d,e')).toThrow(ScpiMalformedReplyError);
  });
});
