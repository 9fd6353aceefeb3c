/**
 * The program-message policy and per-command waits against the simulated meter over TCP on 127.0.0.1.
 * An instrument that takes one command per message (the simulated 'no-joined-messages' fault, which
 * refuses a message of several units with −100 "Command error", SCPI-1999 error list, recalled from
 * memory, and so never answers its query) refuses the shipped profile's joined messages (IEEE 488.2 §7.1 units separated by ';', recalled)
 * and works with "programMessages": "separate". A command's waitS holds the next command back at least
 * that long (lower bound only: a loaded machine may take longer, never less).
 */
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { startSimulatedBench, type SimulatedBench } from '../../../app/sim';
import { builtInProfiles, openInstrument, validateProfile, type MeterProfile } from '../../../app/bench';
import { ScpiTimeoutError, TrafficLog } from '../../../app/scpi';
import { TEST_DESIGN_JSON } from './bench-scenario';

const shipped = builtInProfiles().find((p) => p.id === 'scpi-meter') as MeterProfile;

function meterVariant(id: string, changes: Record<string, unknown>): MeterProfile {
  const { source: _s, builtIn: _b, waitsS: _w, references: _r, ...json } = shipped;
  return validateProfile({ ...json, id, description: `test variant ${id} (invented)`, ...changes }, `${id}.json`) as MeterProfile;
}

describe('program-message policy and per-command waits', () => {
  let bench: SimulatedBench;
  beforeAll(async () => {
    bench = await startSimulatedBench({ design: TEST_DESIGN_JSON, tcpPort: 0, timeScale: 10 });
  });
  afterAll(async () => {
    await bench?.stop();
  });
  afterEach(async () => {
    await bench.setFault('all', null);
  });

  it('an instrument that refuses joined messages refuses the shipped (joined) profile, and works with "separate"', async () => {
    await bench.setFault('meter', { kind: 'no-joined-messages' });
    const joined = await openInstrument(bench.addresses.meter, 'meter', meterVariant('joined-meter', { timeoutS: 0.5 }));
    try {
      // The joined settings-plus-error-query message is refused whole: no reply, and −100 in the queue.
      const error = await joined.control.setIntegration(0.02).catch((e) => e);
      expect(error).toBeInstanceOf(ScpiTimeoutError);
      expect((await joined.session.drainErrors())[0]).toMatchObject({ code: -100 });
    } finally {
      await joined.close();
    }
    const traffic: string[] = [];
    const log = new TrafficLog();
    log.subscribe((entry) => entry.direction === 'sent' && traffic.push(entry.text));
    const separate = await openInstrument(bench.addresses.meter, 'meter', meterVariant('separate-meter', { programMessages: 'separate' }), { traffic: log });
    try {
      await separate.control.setIntegration(0.02);
      await separate.control.setRange('auto');
      const reading = await separate.control.readDcV();
      expect(reading.flag).toBe('ok');
      expect(traffic.length).toBeGreaterThan(4);
      for (const line of traffic) expect(line, 'one command per write').not.toContain(';');
      expect(await separate.session.drainErrors()).toEqual([]);
    } finally {
      await separate.close();
    }
  });

  it('waits after a command that asks for it before sending the next', async () => {
    const waiting = meterVariant('waiting-meter', { operations: { ...shipped.operations, integration: [{ send: 'SENSe:VOLTage:AC:APERture {integrationS}', waitS: 0.15 }, 'SENSe:VOLTage:DC:APERture {integrationS}'] } });
    const sentAtMs: Array<[string, number]> = [];
    const log = new TrafficLog();
    log.subscribe((entry) => entry.direction === 'sent' && sentAtMs.push([entry.text, performance.now()]));
    const meter = await openInstrument(bench.addresses.meter, 'meter', waiting, { traffic: log });
    try {
      await meter.control.setIntegration(0.02);
      const ac = sentAtMs.find(([text]) => text.includes('AC:APER'))!;
      const dc = sentAtMs.find(([text]) => text.includes('DC:APER'))!;
      expect(ac[0]).not.toContain('DC:APER'); // the wait ends the batch
      expect(dc[1] - ac[1]).toBeGreaterThanOrEqual(150 - 1);
      expect(await meter.session.drainErrors()).toEqual([]);
    } finally {
      await meter.close();
    }
  });

  it('a bad wait or policy is refused naming the field', () => {
    expect(() => meterVariant('bad-wait', { operations: { ...shipped.operations, integration: { send: 'X {integrationS}', waitS: -1 } } })).toThrow(/operations\.integration\.waitS/);
    expect(() => meterVariant('bad-policy', { programMessages: 'sometimes' })).toThrow(/programMessages/);
  });
});
