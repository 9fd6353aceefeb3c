/**
 * The scope profile format against the simulated scope over TCP on 127.0.0.1: user profiles that
 * describe other data formats (ASCII, unsigned 8-bit big-endian, signed 16-bit big-endian, 32-bit float
 * little-endian — FORMat[:DATA] / FORMat:BORDer of SCPI-1999 Vol. 2, chapter recalled from memory),
 * scaling from fixed values and from a standard query (SENSe:SWEep:TINTerval?), and acquisition
 * completion by polling STATus:OPERation:CONDition? until the MEASuring bit (bit 4, value 16; recalled
 * from memory) clears. Each variant reads the same record as the shipped 16-bit profile; they must agree
 * within the coarser format's quantisation step (half a code), the figure of a rounding converter.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startSimulatedBench, type SimulatedBench } from '../../../app/sim';
import { builtInProfiles, openInstrument, validateProfile, type ScopeProfile, type Waveform } from '../../../app/bench';
import { ScpiMalformedReplyError, TrafficLog } from '../../../app/scpi';
import { TEST_DESIGN_JSON } from './bench-scenario';

const shipped = builtInProfiles().find((p) => p.id === 'scpi-scope') as ScopeProfile;

/** A user profile: the shipped scope with other init commands and scope settings. */
function variant(id: string, changes: { init: string[]; scope: Record<string, unknown>; operations?: Record<string, string | undefined> }): ScopeProfile {
  const operations: Record<string, unknown> = { ...shipped.operations, ...changes.operations };
  for (const [name, value] of Object.entries(operations)) if (value === undefined) delete operations[name];
  const json = { id, role: 'scope', description: `test variant ${id} (invented)`, init: changes.init, timeoutS: 5, operations, scope: { divisions: 10, ...changes.scope } };
  return validateProfile(json, `${id}.json`) as ScopeProfile;
}

/** Channel ranges in volts (SENSe<n>:VOLTage:RANGe): the test stage's input and its larger output both inside. */
const RANGE_V = { 1: 1, 2: 5 } as const;
/** Half a code of a converter with `codes` codes per range, per channel. */
const halfCode = (codes: number) => ({ 1: RANGE_V[1] / codes / 2, 2: RANGE_V[2] / codes / 2 });
const plus = (a: { 1: number; 2: number }, b: { 1: number; 2: number }) => ({ 1: a[1] + b[1], 2: a[2] + b[2] });
const both = (v: number) => ({ 1: v, 2: v });

describe('scope profile format against the simulated scope', () => {
  let bench: SimulatedBench;
  let reference: { 1: Waveform; 2: Waveform };

  beforeAll(async () => {
    bench = await startSimulatedBench({ design: TEST_DESIGN_JSON, tcpPort: 0, timeScale: 10, seed: 11 });
    const generator = await openInstrument(bench.addresses.generator, 'generator', 'scpi-generator', { maxStimulusVpp: 2 });
    await generator.control.configureSine({ frequencyHz: 1000, amplitudeVpp: 1, offsetV: 0 });
    await generator.control.setOutput(true);
    await generator.close();
    const scope = await openInstrument(bench.addresses.scope, 'scope', shipped);
    await scope.control.setupChannels({ 1: RANGE_V[1] / 5, 2: RANGE_V[2] / 5 });
    await scope.control.setTimebase(0.004);
    await scope.control.acquire();
    reference = await scope.control.fetchBoth();
    await scope.close();
  });
  afterAll(async () => {
    await bench?.stop();
  });

  /** Reads both channels of the record already captured through `profile` (no new acquisition). */
  async function readThrough(profile: ScopeProfile): Promise<{ 1: Waveform; 2: Waveform }> {
    const scope = await openInstrument(bench.addresses.scope, 'scope', profile);
    try {
      return await scope.control.fetchBoth();
    } finally {
      await scope.close();
    }
  }

  function expectSameRecord(read: { 1: Waveform; 2: Waveform }, toleranceV: { 1: number; 2: number }): void {
    for (const channel of [1, 2] as const) {
      expect(read[channel].samplesV.length).toBe(reference[channel].samplesV.length);
      expect(read[channel].sampleIntervalS).toBeCloseTo(reference[channel].sampleIntervalS, 15);
      let worst = 0;
      for (let i = 0; i < read[channel].samplesV.length; i++) worst = Math.max(worst, Math.abs(read[channel].samplesV[i] - reference[channel].samplesV[i]));
      expect(worst, `channel ${channel}`).toBeLessThanOrEqual(toleranceV[channel]);
      expect(read[channel].clipped).toBe(false);
    }
  }

  it('ASCII data with the sample interval from the standard SENSe:SWEep:TINTerval? and no volts scaling', async () => {
    const ascii = variant('ascii-scope', {
      init: ['FORMat:DATA ASCii'],
      scope: { data: { format: 'ascii' }, scaling: { fields: ['sampleIntervalS'] } },
      operations: { waveformScaling: 'SENSe:SWEep:TINTerval?', waveformBoth: undefined },
    });
    // NR3 with 9 significant digits against 16-bit codes: within half a 16-bit code of 2.5 V / 32000.
    expectSameRecord(await readThrough(ascii), plus(halfCode(32000), both(1e-8)));
  });

  it('unsigned 8-bit codes around a code offset, big-endian 16-bit, and little-endian 32-bit floats', async () => {
    const u8 = variant('u8-scope', { init: ['FORMat:DATA UINTeger,8'], scope: { data: { format: 'binary', sample: 'uint8' }, scaling: shipped.scope.scaling } });
    expectSameRecord(await readThrough(u8), plus(halfCode(125), halfCode(32000)));
    const big16 = variant('be16-scope', { init: ['FORMat:DATA INTeger,16', 'FORMat:BORDer NORMal'], scope: { data: { format: 'binary', sample: 'int16', byteOrder: 'big' }, scaling: shipped.scope.scaling } });
    expectSameRecord(await readThrough(big16), both(0));
    const float = variant('f32-scope', {
      init: ['FORMat:DATA REAL,32', 'FORMat:BORDer SWAPped'],
      scope: { data: { format: 'binary', sample: 'float32', byteOrder: 'little' }, scaling: shipped.scope.scaling },
    });
    // float32 carries 24 significant bits: far finer than half a 16-bit code.
    expectSameRecord(await readThrough(float), plus(halfCode(32000), both(1e-6)));
  });

  it('fixed scaling with no scaling query at all', async () => {
    const fixed = variant('fixed-scope', {
      init: ['FORMat:DATA INTeger,16', 'FORMat:BORDer SWAPped'],
      scope: { data: { format: 'binary', sample: 'int16', byteOrder: 'little' }, scaling: { fixed: { sampleIntervalS: reference[1].sampleIntervalS, voltsPerCode: RANGE_V[1] / 32000 } } },
      operations: { waveformScaling: undefined, waveformBoth: 'TRACe:DATA? CH1;TRACe:DATA? CH2' },
    });
    // One fixed volts-per-code for both channels: set both to channel 1's range first.
    const read = await readThrough(fixed);
    expect(read[1].samplesV).toEqual(reference[1].samplesV);
    expect(read[2].samplesV[10] / reference[2].samplesV[10]).toBeCloseTo(RANGE_V[1] / RANGE_V[2], 12);
  });

  it('a profile that expects the wrong sample size is told so, with the bytes received', async () => {
    const wrong = variant('wrong-scope', { init: ['FORMat:DATA INTeger,16'], scope: { data: { format: 'binary', sample: 'float64', byteOrder: 'little' }, scaling: shipped.scope.scaling } });
    const error = await readThrough(wrong).catch((e) => e);
    expect(error).toBeInstanceOf(ScpiMalformedReplyError);
    expect((error as Error).message).toMatch(/2000 samples as the scaling says, not 500/);
  });

  it('acquisition completion by polling a status query until a bit clears', async () => {
    const polled = variant('poll-scope', {
      init: ['*CLS', 'FORMat:DATA INTeger,16', 'FORMat:BORDer SWAPped'],
      scope: {
        data: shipped.scope.data,
        scaling: shipped.scope.scaling,
        acquisitionComplete: { method: 'poll', query: 'STATus:OPERation:CONDition?', until: { bitsClear: 16 }, intervalS: 0.002 },
      },
    });
    const traffic: string[] = [];
    const log = new TrafficLog();
    log.subscribe((entry) => traffic.push(`${entry.direction} ${entry.text}`));
    const scope = await openInstrument(bench.addresses.scope, 'scope', polled, { traffic: log });
    try {
      await scope.control.setTimebase(0.2); // 0.2 s of bench time: 20 ms of wall time at time scale 10
      await scope.control.acquire();
      const polls = traffic.filter((line) => line.startsWith('sent') && line.includes('STATus:OPERation:CONDition?'));
      expect(polls.length).toBeGreaterThanOrEqual(2); // measuring at first, then clear
      expect(traffic.some((line) => line.includes('*OPC?'))).toBe(false);
      const record = await scope.control.fetchBoth();
      expect(record[2].samplesV.length).toBe(2000);
    } finally {
      await scope.close();
    }
  });
});
