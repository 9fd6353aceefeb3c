/**
 * The simulated scope's single acquisition: *OPC? answers once the record's
 * time is over (IEEE 488.2 §10.19 *OPC?, recalled from memory), the samples
 * still being computed then are waited for by the data queries, and a data
 * query while the record runs is refused with -230 "Data corrupt or stale"
 * (SCPI-1999 Vol. 2 §21.8, recalled from memory).
 */
import { describe, expect, it } from 'vitest';
import { SimGenerator } from '../../../app/sim/sim-generator';
import { SimScope } from '../../../app/sim/sim-scope';
import { BenchModel } from '../../../app/sim/bench-model';
import { CircuitUnderTest } from '../../../app/sim/circuit-under-test';
import { scaledClock } from '../../../app/bench';
import { parseDesign } from '../../../app/circuit';

const DESIGN = parseDesign({
  name: 'unit-test inverter (invented)',
  input: 'in',
  output: 'out',
  parts: [
    { id: 'R1', type: 'resistor', nodes: ['in', 'inv'], value: '1k' },
    { id: 'R2', type: 'resistor', nodes: ['inv', 'out'], value: '1k' },
    { id: 'U1', type: 'opamp', nodes: ['0', 'inv', 'out'], model: { openLoopGain: 1e5, gbw: 1e6, slewRate: 5e5, rails: [-12, 12] } },
  ],
});

async function benchWithSine(): Promise<SimScope> {
  const clock = scaledClock(1);
  const model = new BenchModel(new CircuitUnderTest(DESIGN, 50), clock, 0, 1);
  const generator = new SimGenerator(model, clock);
  await generator.execute('FUNC SIN;FREQ 1000;VOLT 2;OUTP ON');
  const scope = new SimScope(model, clock);
  await scope.execute('FORM:DATA INT,16;SENS2:VOLT:RANG 2.5');
  return scope;
}

/** Samples of a definite-length block `#<n><length><int16 big-endian codes>`. */
function codes(block: Uint8Array): Int16Array {
  const digits = Number(String.fromCharCode(block[1]));
  const length = Number(new TextDecoder().decode(block.subarray(2, 2 + digits)));
  const view = new DataView(block.buffer, block.byteOffset + 2 + digits, length);
  return Int16Array.from({ length: length / 2 }, (_, i) => view.getInt16(i * 2, false));
}

describe('simulated scope acquisition', () => {
  it('answers *OPC? when the record time is over, never before', async () => {
    const scope = await benchWithSine();
    await scope.execute('SWE:TIME 0.02'); // 20 ms record
    const startedMs = performance.now();
    expect(await scope.execute('INIT;*OPC?')).toBe('1');
    // Lower bound only: a loaded machine may answer later, never earlier (timer granularity allowance 0.5 ms, common practice).
    expect(performance.now() - startedMs).toBeGreaterThanOrEqual(20 - 0.5);
  });

  it('gives the whole record, last samples included, to a data query right after *OPC?', async () => {
    const scope = await benchWithSine();
    await scope.execute('SWE:TIME 0.00001'); // 10 µs record: every sample is computed after its time is over
    expect(await scope.execute('INIT;*OPC?')).toBe('1');
    const reply = await scope.execute('TRAC:DATA? CH2');
    expect(reply).toBeInstanceOf(Uint8Array);
    const samples = codes(reply as Uint8Array);
    expect(samples.length).toBe(2000);
    // 2 Vpp through a gain of −1 (R2/R1) on a 2.5 V range: the output is far from 0 V for most of a 1 kHz cycle, but a
    // 10 µs record spans 1 % of it, so its level is whatever the phase is: check the record is not left empty
    // instead — unset samples would read exactly 0 (an uncomputed Float64Array).
    const lastSlice = samples.subarray(samples.length - 64);
    expect(lastSlice.some((code) => code !== 0)).toBe(true);
    expect(await scope.execute('SYST:ERR?')).toBe('0,"No error"');
  });

  it('refuses a data query while the record is still running (-230)', async () => {
    const scope = await benchWithSine();
    await scope.execute('SWE:TIME 0.1'); // 100 ms record
    await scope.execute('INIT');
    expect(await scope.execute('TRAC? CH1')).toBeUndefined();
    expect(await scope.execute('SYST:ERR?')).toMatch(/^-230,/);
    expect(await scope.execute('*OPC?')).toBe('1');
  });

  it('reports the record as measuring in STATus:OPERation:CONDition? (bit 4) until its time is over', async () => {
    const scope = await benchWithSine();
    await scope.execute('SWE:TIME 0.03');
    expect(await scope.execute('STAT:OPER:COND?')).toBe('0');
    await scope.execute('INIT');
    expect(await scope.execute('STAT:OPER:COND?')).toBe('16');
    await scope.execute('*OPC?');
    expect(await scope.execute('STAT:OPER:COND?')).toBe('0');
  });

  it('speaks no maker dialect: the old channel, time-base, waveform and measure headers are undefined (-113)', async () => {
    const scope = await benchWithSine();
    for (const header of ['CHAN1:SCAL 1', 'TIM:SCAL 0.001', 'WAV:SOUR CHAN1', 'WAV:DATA?', 'WAV:PRE?', 'MEAS:VPP? CHAN1', 'MEAS:PHAS? CHAN1,CHAN2', 'ACQ:POIN 1000']) {
      await scope.execute(header);
      expect(await scope.execute('SYST:ERR?'), header).toMatch(/^-113,/);
    }
  });

  it('refuses named headers with -113 when told to (the unknown-headers fault), and only those', async () => {
    const scope = await benchWithSine();
    scope.refuseHeaders(['INPut#[:STATe]']);
    await scope.execute('INP2:STAT ON');
    expect(await scope.execute('SYST:ERR?')).toBe('-113,"Undefined header; INP2:STAT"');
    await scope.execute('SENS2:VOLT:RANG 1');
    expect(await scope.execute('SYST:ERR?')).toBe('0,"No error"');
  });
});
