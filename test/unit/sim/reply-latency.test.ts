/**
 * The simulated bench's latency model (our definition, app/sim/link-server.ts
 * and SimInstrument.run): a reply leaves `latencyS` after the moment it was
 * determined — when the instrument began the message, or, for a reply that
 * waits on an operation (*OPC? on a record), when the wait ended. So it is never
 * sooner than the latency after the query was sent, nor sooner than the latency
 * after the record's end; the simulation's own computing is not added on top.
 * The instrument begins a message when it has arrived over the link and the
 * message before it is done (or a hang is over), not when the simulated bench's
 * event loop gets round to it.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { connect, type ScpiSession } from '../../../app/scpi';
import { startSimulatedBench, type SimulatedBench } from '../../../app/sim';
import { SimScope } from '../../../app/sim/sim-scope';
import { SimGenerator } from '../../../app/sim/sim-generator';
import { BenchModel } from '../../../app/sim/bench-model';
import { CircuitUnderTest } from '../../../app/sim/circuit-under-test';
import { scaledClock } from '../../../app/bench';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import { parseDesign } from '../../../app/circuit';
import { InstrumentLink } from '../../../app/sim/link-server';
import { FaultState } from '../../../app/sim/faults';
import { SeededRandom } from '../../../app/numeric';

const LATENCY_S = 0.03;
const RECORD_S = 0.02;
const designFile = makeDesignFromTemplate('inverting-lowpass', {});

describe('when a reply is determined (SimInstrument.run)', () => {
  const clock = scaledClock(1);
  const model = new BenchModel(new CircuitUnderTest(parseDesign(designFile), 50), clock, 0, 1);

  it('a message with no waiting unit is determined when its execution begins', async () => {
    const generator = new SimGenerator(model, clock);
    const before = performance.now();
    const running = generator.run(':SOURce:FREQuency 1000;:SYSTem:ERRor?');
    const after = performance.now();
    const { reply, readyAtMs } = await running;
    expect(reply).toBe('0,"No error"');
    expect(readyAtMs).toBeGreaterThanOrEqual(before);
    expect(readyAtMs).toBeLessThanOrEqual(after);
  });

  it('*OPC? after INITiate is determined when the record is over, not before', async () => {
    const scope = new SimScope(model, clock);
    const before = performance.now();
    const { reply, readyAtMs } = await scope.run(`:SENSe:SWEep:TIME ${RECORD_S};:INITiate;*OPC?`);
    expect(reply).toBe('1');
    expect(readyAtMs - before).toBeGreaterThanOrEqual(RECORD_S * 1000);
  });
});

describe('reply latency over a real link', () => {
  let bench: SimulatedBench;
  let scope: ScpiSession;
  beforeAll(async () => {
    bench = await startSimulatedBench({ design: designFile, tcpPort: 0, latencyS: LATENCY_S });
    scope = await connect(bench.addresses.scope);
  });
  afterAll(async () => {
    await scope?.close();
    await bench?.stop();
  });

  it('an immediate reply comes no sooner than the latency after the query was sent', async () => {
    for (let i = 0; i < 3; i++) {
      const sent = performance.now();
      expect(await scope.query('SYSTem:ERRor?')).toBe('0,"No error"');
      expect(performance.now() - sent).toBeGreaterThanOrEqual(LATENCY_S * 1000);
    }
  });

  it('*OPC? on a record comes no sooner than the record plus the latency', async () => {
    for (let i = 0; i < 3; i++) {
      const sent = performance.now();
      expect(await scope.query(`:SENSe:SWEep:TIME ${RECORD_S};:INITiate;*OPC?`)).toBe('1');
      expect(performance.now() - sent).toBeGreaterThanOrEqual((RECORD_S + LATENCY_S) * 1000);
    }
  });
});

describe('when the instrument begins a message (InstrumentLink)', () => {
  const clock = scaledClock(1);
  const model = new BenchModel(new CircuitUnderTest(parseDesign(designFile), 50), clock, 0, 1);

  /** A generator that notes when the link says each message began, and a link that notes when each reply was written. */
  function linked() {
    const began: number[] = [];
    class NotingGenerator extends SimGenerator {
      override run(message: string, beganAtMs?: number) {
        began.push(beganAtMs ?? NaN);
        return super.run(message, beganAtMs);
      }
    }
    const written: number[] = [];
    const faults = new FaultState();
    const link = new InstrumentLink(new NotingGenerator(model, clock), { write: () => void written.push(performance.now()) }, { latencyS: LATENCY_S, faults, random: new SeededRandom(1) });
    const repliesWritten = async (count: number) => {
      while (written.length < count) await new Promise((resolve) => setTimeout(resolve, 1));
    };
    return { began, written, faults, link, repliesWritten };
  }
  const bytes = (text: string) => new TextEncoder().encode(text);

  it('a message begins when it arrived, and its reply leaves no sooner than the latency after that', async () => {
    const { began, written, link, repliesWritten } = linked();
    const before = performance.now();
    link.receive(bytes('SYSTem:ERRor?\n'));
    const after = performance.now();
    await repliesWritten(1);
    expect(began[0]).toBeGreaterThanOrEqual(before);
    expect(began[0]).toBeLessThanOrEqual(after);
    expect(written[0] - began[0]).toBeGreaterThanOrEqual(LATENCY_S * 1000);
  });

  it('a message that arrived while the one before was under way begins when that one is done', async () => {
    const { began, written, link, repliesWritten } = linked();
    link.receive(bytes('SYSTem:ERRor?\nSYSTem:ERRor?\n'));
    await repliesWritten(2);
    expect(began[1]).toBeGreaterThanOrEqual(written[0]);
    expect(written[1] - written[0]).toBeGreaterThanOrEqual(LATENCY_S * 1000);
  });

  it('a message that arrived during a hang begins when the hang is over', async () => {
    const { began, faults, link, repliesWritten } = linked();
    faults.set({ kind: 'hang' });
    link.receive(bytes('SYSTem:ERRor?\n'));
    await new Promise((resolve) => setTimeout(resolve, 20));
    const released = performance.now();
    faults.set(undefined);
    await repliesWritten(1);
    expect(began[0]).toBeGreaterThanOrEqual(released);
  });
});
