/**
 * The session over TCP on 127.0.0.1 against the simulated bench: the shared
 * scenario, then error queue, overrange/NaN and every injected fault surfacing
 * as its named error. Sources: SCPI-1999 (error codes -113/-222, 9.9E37 and
 * 9.91E37 — recalled from memory), IEEE 488.2 (framing), else common practice.
 */
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { startSimulatedBench, type SimulatedBench } from '../../../app/sim';
import { connect, ScpiDisconnectedError, ScpiMalformedReplyError, ScpiTimeoutError, ScpiInstrumentError } from '../../../app/scpi';
import { openInstrument } from '../../../app/bench';
import { parseDesign, solveDcTransfer } from '../../../app/circuit';
import { openBench, runBenchScenario, TEST_DESIGN_JSON } from './bench-scenario';

describe('simulated bench over TCP on 127.0.0.1', () => {
  let bench: SimulatedBench;
  beforeAll(async () => {
    bench = await startSimulatedBench({ design: TEST_DESIGN_JSON, tcpPort: 0, timeScale: 10, seed: 5 });
  });
  afterAll(async () => {
    await bench?.stop();
  });
  afterEach(async () => {
    await bench.setFault('all', null);
  });

  it('listens on loopback only', () => {
    for (const address of Object.values(bench.addresses)) expect(address).toMatch(/^tcp:\/\/127\.0\.0\.1:\d+$/);
  });

  it('passes the scenario: *IDN?, frequency read-back, meter vs theory, scope waveforms intact', async () => {
    await runBenchScenario(bench);
  });

  it('queues -113 for an unknown header and -222 for an out-of-range value; the profile layer raises ScpiInstrumentError', async () => {
    const session = await connect(bench.addresses.generator, { timeoutS: 0.5 });
    await expect(session.query('SOURce:WOBBle?', { timeoutS: 0.2 })).rejects.toBeInstanceOf(ScpiTimeoutError);
    await session.write('SOURce:FREQuency 1e12');
    const errors = await session.drainErrors();
    expect(errors.map((e) => e.code)).toEqual([-113, -222]);
    await expect(session.throwIfErrors('x')).resolves.toBeUndefined();
    await session.write('OUTPut:STATe MAYBE');
    await expect(session.throwIfErrors('OUTPut:STATe MAYBE')).rejects.toBeInstanceOf(ScpiInstrumentError);
    await session.close();
  });

  it('a setting the instrument rejects surfaces as ScpiInstrumentError naming it, before the next measurement', async () => {
    const scope = await openInstrument(bench.addresses.scope, 'scope', 'scpi-scope');
    try {
      // The simulated scope's range ends at 500 V (100 V/div over 10 divisions is ±2500 V); the setting call itself reads the error queue.
      const error = await scope.control.setVerticalScale(1, 500).catch((e) => e);
      expect(error).toBeInstanceOf(ScpiInstrumentError);
      expect(error).toMatchObject({ code: -222 });
      expect((error as ScpiInstrumentError).command).toContain('SENSe1:VOLTage:RANGe 2500');
      await expect(scope.control.acquire()).resolves.toBeUndefined();
    } finally {
      await scope.close();
    }
  });

  it('reads overrange on a too-small fixed meter range, and the injected overrange / NaN faults, as flags without values', async () => {
    const { generator, meter, close } = await openBench(bench);
    try {
      await generator.control.configureSine({ frequencyHz: 1000, amplitudeVpp: 1, offsetV: 0 });
      await generator.control.setOutput(true);
      await meter.control.setIntegration(0.01);
      await meter.control.setRange(0.1); // output ≈ 2.4 V RMS on a 0.1 V range
      const physical = await meter.control.readAcRmsV();
      expect(physical.flag).toBe('overrange');
      expect(Number.isNaN(physical.value)).toBe(true);
      await meter.control.setRange('auto');
      expect((await meter.control.readAcRmsV()).flag).toBe('ok');
      await bench.setFault('meter', { kind: 'nan' });
      expect((await meter.control.readAcRmsV()).flag).toBe('nan');
      await bench.setFault('meter', { kind: 'overrange' });
      expect((await meter.control.readDcV()).flag).toBe('overrange');
    } finally {
      await close();
    }
  });

  it('garbage replies surface as ScpiMalformedReplyError; the session recovers when they stop', async () => {
    const session = await connect(bench.addresses.meter, { timeoutS: 0.5 });
    await bench.setFault('meter', { kind: 'garbage' });
    let malformed = 0;
    for (let i = 0; i < 20; i++) {
      try {
        await session.identify();
      } catch (error) {
        if (error instanceof ScpiMalformedReplyError) malformed++;
        else if (!(error instanceof ScpiTimeoutError)) throw error;
      }
    }
    expect(malformed).toBeGreaterThan(10);
    await bench.setFault('meter', null);
    await new Promise((resolve) => setTimeout(resolve, 50));
    expect((await session.identify()).model).toBe('simulated meter');
    await session.close();
  });

  it('a hung instrument times out with ScpiTimeoutError, and answers again once released', async () => {
    const session = await connect(bench.addresses.scope, { timeoutS: 0.3 });
    await bench.setFault('scope', { kind: 'hang' });
    await expect(session.query('*OPC?')).rejects.toBeInstanceOf(ScpiTimeoutError);
    await bench.setFault('scope', null);
    // The command queued during the hang is answered late; the session drops that stale reply.
    await new Promise((resolve) => setTimeout(resolve, 50));
    expect((await session.identify()).model).toBe('simulated scope');
    await session.close();
  });

  it('missing and slow replies: no-reply times out, slow replies arrive after the delay', async () => {
    const session = await connect(bench.addresses.generator, { timeoutS: 0.3 });
    await bench.setFault('generator', { kind: 'no-reply' });
    await expect(session.query('*IDN?')).rejects.toBeInstanceOf(ScpiTimeoutError);
    await bench.setFault('generator', { kind: 'slow', delayS: 0.15 });
    const started = performance.now();
    expect((await session.identify()).model).toBe('simulated generator');
    expect(performance.now() - started).toBeGreaterThanOrEqual(140);
    await session.close();
  });

  it('a dropped link rejects the query in flight with ScpiDisconnectedError; a new connection works', async () => {
    const opened = await openInstrument(bench.addresses.meter, 'meter', 'scpi-meter');
    await opened.control.setIntegration(5);
    const inFlight = opened.control.readAcRmsV();
    await new Promise((resolve) => setTimeout(resolve, 50));
    await bench.setFault('meter', { kind: 'drop-link' });
    await expect(inFlight).rejects.toBeInstanceOf(ScpiDisconnectedError);
    await expect(opened.session.identify()).rejects.toBeInstanceOf(ScpiDisconnectedError);
    const again = await openInstrument(bench.addresses.meter, 'meter', 'scpi-meter');
    await again.control.setIntegration(0.01);
    expect((await again.control.readDcV()).flag).toBe('ok');
    await again.close();
  });

  it('DC transfer of a diode-feedback log stage: meter DC readings match the theory engine\'s DC solve within 1 mV', async () => {
    // Expected: app/circuit solveDcTransfer on the design with the generator's 50 Ω in series (divider model).
    const logStage = parseDesign({
      name: 'log stage (invented)',
      input: 'in',
      output: 'out',
      parts: [
        { id: 'R1', type: 'resistor', nodes: ['in', 'inv'], value: '10k' },
        { id: 'D1', type: 'diode', nodes: ['inv', 'out'], model: { is: 1e-14, n: 1, rs: 0.5 } },
        { id: 'U1', type: 'opamp', nodes: ['0', 'inv', 'out'], model: { openLoopGain: 1e5, gbw: 1e6, rails: [-12, 12] } },
      ],
    });
    const dcBench = await startSimulatedBench({ design: logStage, tcpPort: 0, timeScale: 100 });
    const generator = await openInstrument(dcBench.addresses.generator, 'generator', 'scpi-generator', { maxStimulusVpp: 20 });
    const meter = await openInstrument(dcBench.addresses.meter, 'meter', 'scpi-meter');
    try {
      await generator.control.configureDc(0);
      await generator.control.setOutput(true);
      await meter.control.setIntegration(0.02);
      const levels = Float64Array.of(0.01, 0.1, 1, 10);
      const withSource = { ...logStage, input: 'emf', parts: [...logStage.parts, { id: 'RS', type: 'resistor' as const, nodes: ['emf', 'in'] as [string, string], value: 50 }] };
      const expected = solveDcTransfer(withSource, levels).outputV;
      for (let i = 0; i < levels.length; i++) {
        await generator.control.configureDc(levels[i]);
        await dcBench.clock.sleepS(10 * dcBench.model.circuit.timeConstantS);
        const reading = await meter.control.readDcV();
        expect(reading.flag).toBe('ok');
        expect(Math.abs(reading.value - expected[i])).toBeLessThan(1e-3);
      }
      // Slope about n·VT·ln 10 ≈ 59 mV per decade at 25 °C (Shockley diode, handbook formula).
      expect(expected[2] - expected[3]).toBeGreaterThan(0.055);
    } finally {
      await generator.close();
      await meter.close();
      await dcBench.stop();
    }
  });

  it('refuses to connect to a closed port with a clear ConnectError', async () => {
    const probe = await startSimulatedBench({ design: TEST_DESIGN_JSON, tcpPort: 0 });
    const address = probe.addresses.generator;
    await probe.stop();
    await expect(connect(address)).rejects.toThrow(/cannot open tcp:\/\/127\.0\.0\.1:\d+/);
  });
});
