/**
 * The simulated instruments' SCPI parser and error behaviour. Sources:
 * SCPI-1999 Vol. 1 §6 (short/long forms, optional nodes, numeric suffixes),
 * Vol. 2 §21.8 error codes (-113 Undefined header, -222 Data out of range,
 * -350 Queue overflow), IEEE 488.2 §11.5.1.1 ESR bits (CME 32, EXE 16) —
 * clause numbers recalled from memory.
 */
import { describe, expect, it } from 'vitest';
import { HeaderPattern, splitProgramMessage } from '../../../app/sim/program-message';
import { SimGenerator } from '../../../app/sim/sim-generator';
import { SimScope } from '../../../app/sim/sim-scope';
import { BenchModel } from '../../../app/sim/bench-model';
import { CircuitUnderTest } from '../../../app/sim/circuit-under-test';
import { scaledClock } from '../../../app/bench';
import { parseDesign } from '../../../app/circuit';

const DESIGN = parseDesign({
  name: 'unit-test follower (invented)',
  input: 'in',
  output: 'out',
  parts: [
    { id: 'R1', type: 'resistor', nodes: ['in', 'inv'], value: '1k' },
    { id: 'R2', type: 'resistor', nodes: ['inv', 'out'], value: '1k' },
    { id: 'U1', type: 'opamp', nodes: ['0', 'inv', 'out'], model: { openLoopGain: 1e5, gbw: 1e6, slewRate: 5e5, rails: [-12, 12] } },
  ],
});

function generator(): SimGenerator {
  const clock = scaledClock(1);
  return new SimGenerator(new BenchModel(new CircuitUnderTest(DESIGN, 50), clock, 0, 1), clock);
}

describe('HeaderPattern (SCPI-1999 Vol. 1 §6, recalled)', () => {
  const pattern = new HeaderPattern('[SOURce]:VOLTage[:LEVel][:IMMediate]:OFFSet');
  it('accepts short and long forms in any case, with or without optional nodes', () => {
    for (const header of ['SOUR:VOLT:OFFS', ':source:voltage:level:immediate:offset', 'VOLT:OFFS', 'volt:lev:offs']) expect(pattern.match(header), header).toEqual([]);
  });
  it('refuses partial forms that are neither short nor long', () => {
    for (const header of ['SOURC:VOLT:OFFS', 'VOLTA:OFFS', 'VOLT:OFFSET?']) expect(pattern.match(header), header).toBeUndefined();
  });
  it('captures numeric suffixes, 1 when omitted', () => {
    const channel = new HeaderPattern('SENSe#:VOLTage:RANGe');
    expect(channel.match('SENS2:VOLT:RANG')).toEqual([2]);
    expect(channel.match('SENSE:VOLTAGE:RANGE')).toEqual([1]);
  });
  it('splits program message units on ";" outside quotes', () => {
    expect(splitProgramMessage('FUNC "VOLT:AC;X";READ?')).toEqual([
      { header: 'FUNC', params: ['"VOLT:AC;X"'] },
      { header: 'READ?', params: [] },
    ]);
  });
});

describe('simulated instrument errors', () => {
  it('queues -113 "Undefined header" for an unknown command and sets ESR bit 5 (CME = 32)', async () => {
    const gen = generator();
    expect(await gen.execute('SOUR:WOBBLE 3')).toBeUndefined();
    expect(await gen.execute('SYST:ERR?')).toMatch(/^-113,"Undefined header/);
    expect(await gen.execute('SYST:ERR?')).toBe('0,"No error"');
    await gen.execute('BOGUS');
    expect(await gen.execute('*ESR?')).toBe('32');
    expect(await gen.execute('*ESR?')).toBe('0');
  });

  it('the simulated scope refuses old maker-dialect headers with -113 and answers nothing, as an instrument of SCPI-1999 terms only', async () => {
    const clock = scaledClock(1);
    const scope = new SimScope(new BenchModel(new CircuitUnderTest(DESIGN, 50), clock, 0, 1), clock);
    for (const header of ['WAVeform:DATA?', 'WAV:PRE?', 'CHANnel1:SCALe 0.5', 'TIMebase:SCALe 1E-3', 'ACQuire:POINts 1000', 'MEASure:VPP? CHANnel1']) {
      expect(await scope.execute(header), header).toBeUndefined();
      expect(await scope.execute('SYST:ERR?'), header).toMatch(/^-113,"Undefined header/);
    }
    expect(await scope.execute('SYST:ERR?')).toBe('0,"No error"');
  });

  it('queues -222 "Data out of range" for a frequency beyond the generator and keeps the old value', async () => {
    const gen = generator();
    await gen.execute('SOUR:FREQ 2000');
    await gen.execute('SOUR:FREQ 1e12');
    expect(await gen.execute('SYST:ERR?')).toMatch(/^-222,"Data out of range/);
    expect(Number(await gen.execute('SOUR:FREQ?'))).toBe(2000);
    expect(await gen.execute('*ESR?')).toBe('16');
  });

  it('bounds the queue: overflow replaces the last entry with -350 (SCPI-1999, recalled)', async () => {
    const gen = generator();
    for (let i = 0; i < 25; i++) await gen.execute('NOPE');
    const entries: string[] = [];
    for (let i = 0; i < 21; i++) entries.push(String(await gen.execute('SYST:ERR?')));
    expect(entries.filter((e) => e.startsWith('-113'))).toHaveLength(19);
    expect(entries[19]).toMatch(/^-350,"Queue overflow"/);
    expect(entries[20]).toBe('0,"No error"');
  });

  it('answers several queries in one message joined by ";" (IEEE 488.2 §8.4.1, recalled)', async () => {
    const gen = generator();
    await gen.execute('SOUR:FREQ 5000;SOUR:FUNC DC');
    expect(await gen.execute('SOUR:FREQ?;FUNC?')).toBe('+5.00000000E+03;DC');
  });

  it('identifies itself as simulated, and *CLS empties the queue', async () => {
    const gen = generator();
    expect(await gen.execute('*IDN?')).toMatch(/^Rolloff simulated bench \(simulated\),/);
    await gen.execute('NOPE');
    await gen.execute('*CLS');
    expect(await gen.execute('SYST:ERR?')).toBe('0,"No error"');
  });
});
