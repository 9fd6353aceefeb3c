/**
 * The session over a real serial port: serialport on a socat pseudo-terminal
 * pair, against the simulated bench. See bench-scenario.ts for the sources of
 * the expected values.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SerialPort } from 'serialport';
import { openPtyPair, startSimulatedBench, type SimulatedBench } from '../../../app/sim';
import { connect, ScpiDisconnectedError, SerialTransport, ScpiSession } from '../../../app/scpi';
import { runBenchScenario, TEST_DESIGN_JSON } from './bench-scenario';
import { requireTool } from '../../helpers/required-tool';

describe.skipIf(!requireTool('socat'))('simulated bench over a pseudo-terminal (serialport + socat)', () => {
  let bench: SimulatedBench;
  beforeAll(async () => {
    bench = await startSimulatedBench({ design: TEST_DESIGN_JSON, pty: true, timeScale: 10, seed: 3 });
  });
  afterAll(async () => {
    await bench?.stop();
  });

  it('answers on serial:// addresses', () => {
    for (const address of Object.values(bench.addresses)) expect(address).toMatch(/^serial:\/\/\/.+\?baud=115200$/);
  });

  it('passes the scenario: *IDN?, frequency read-back, meter vs theory, scope waveforms intact', async () => {
    await runBenchScenario(bench);
  });

  it('a pulled link (PTY torn down) is ScpiDisconnectedError; reconnecting works', async () => {
    const session = await connect(bench.addresses.meter, { timeoutS: 5 });
    expect((await session.identify()).model).toBe('simulated meter');
    await session.write('SENSe:VOLTage:APERture 5');
    const inFlight = session.query('READ?', { timeoutS: 10 });
    await new Promise((resolve) => setTimeout(resolve, 50));
    await bench.setFault('meter', { kind: 'drop-link' });
    await expect(inFlight).rejects.toBeInstanceOf(ScpiDisconnectedError);
    const again = await connect(bench.addresses.meter, { timeoutS: 5 });
    expect((await again.identify()).model).toBe('simulated meter');
    await again.write('SENSe:VOLTage:APERture 0.1');
    await again.close();
  });
});

describe('openPtyPair helper', () => {
  it('replaces a stale link left by a crashed run, and refuses to overwrite a regular file', async () => {
    const { mkdtempSync, symlinkSync, writeFileSync, readlinkSync, rmSync } = await import('node:fs');
    const { join } = await import('node:path');
    const { tmpdir } = await import('node:os');
    const dir = mkdtempSync(join(tmpdir(), 'rolloff-stale-'));
    try {
      symlinkSync('/nonexistent-pty', join(dir, 'a'));
      const pair = await openPtyPair({ a: join(dir, 'a'), b: join(dir, 'b') });
      expect(readlinkSync(pair.a)).toMatch(/^\/dev\/pts\//);
      await pair.close();
      writeFileSync(join(dir, 'a'), 'precious');
      await expect(openPtyPair({ a: join(dir, 'a'), b: join(dir, 'b') })).rejects.toThrow(/not a pseudo-terminal link/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('carries bytes both ways between its two ends, then cleans up', async () => {
    const pair = await openPtyPair();
    const instrumentEnd = new SerialPort({ path: pair.a, baudRate: 9600 });
    await new Promise((resolve) => instrumentEnd.once('open', resolve));
    instrumentEnd.on('data', (chunk: Buffer) => {
      if (chunk.includes(0x0a)) instrumentEnd.write('pong\r\n');
    });
    const live = await ScpiSession.open(new SerialTransport({ path: pair.b, baudRate: 9600, dataBits: 8, parity: 'none', stopBits: 1, flow: 'none' }), { timeoutS: 2 });
    expect(await live.query('ping?')).toBe('pong');
    await live.close();
    await new Promise<void>((resolve) => instrumentEnd.close(() => resolve()));
    await pair.close();
    const { lstatSync } = await import('node:fs');
    for (const path of [pair.a, pair.b]) expect(() => lstatSync(path)).toThrow();
  });
});
