/**
 * VXI-11 end to end: the simulated bench's server registered with the system
 * portmapper (rpcbind), reached by Rolloff's client, by Debian's
 * python3-pyvisa-py (an independent VISA implementation) and by lxi-tools (an
 * independent VXI-11 client built on the C library's ONC RPC). Expected
 * values come from those independent clients and from the same instruments
 * over a raw TCP socket, never from this file.
 *
 * Every test that registers with the portmapper is in this file: only one
 * process at a time can hold the VXI-11 registration on a machine.
 */
import { execFile } from 'node:child_process';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { connect, ScpiDisconnectedError, ScpiLinkError, ScpiLockedError, ScpiSession, ScpiTimeoutError, Vxi11Transport } from '../../../app/scpi';
import { Vxi11Link } from '../../../app/scpi/vxi11/vxi11-client';
import { getPort } from '../../../app/scpi/vxi11/portmapper';
import { DEVICE_CORE_PROGRAM, DEVICE_CORE_VERSION, Reason } from '../../../app/scpi/vxi11/protocol';
import { startSimulatedBench, type SimulatedBench } from '../../../app/sim';
import { Vxi11RegistrationError } from '../../../app/sim/vxi11-server';
import { UserError } from '../../../app/errors';
import { TEST_DESIGN_JSON } from '../instruments/bench-scenario';
import { ensurePortmapper } from '../../helpers/portmapper';
import { startSimProcess } from '../../helpers/sim-process';
import { requireTool, toolPath } from '../../helpers/required-tool';
import { openServiceAt } from '../../../app/service/open-service';
import { PointFlag, type RunDetail } from '../../../app/contract/contract';
import { invertingGain100, sweepRequest, tempFolder } from '../sweep/helpers';

const run = promisify(execFile);
const PYVISA_CLIENT = join(__dirname, 'pyvisa-client.py');
const ROLLOFF_CLI = join(__dirname, '../../../app/cli/bin.mjs');
const EXAMPLE_DESIGN = join(__dirname, '../../../app/circuit/examples/inverting-lowpass.json');
/** Small on purpose: a 10,000-point record (20,000 bytes) then needs several device_write/device_read calls. */
const SMALL_MAX_RECV_SIZE_BYTES = 16;

const tools = requireTool('rpcbind', 'pyvisaPy');
/** lxi-tools is optional (not in every Debian release): its one check skips alone, pyvisa-py's still run. */
const hasLxi = requireTool('lxi');

/** The status byte's MAV bit: a response is waiting in the output buffer (IEEE 488.2 §11.2, bit 4, recalled from memory). */
const MAV = 0x10;

/** A bare link to the meter (inst1): `send` writes one message (END on it unless `end` is false), `readText` reads one response. */
async function meterLink() {
  const link = await Vxi11Link.open({ host: '127.0.0.1', device: 'inst1' }, 'test link');
  const send = (text: string, end = true) => link.write(new TextEncoder().encode(text), end, 2);
  const readText = async () => new TextDecoder().decode((await link.read(1024, 2)).data).trim();
  return { link, send, readText };
}

/** Waits (up to 2 s) until the device reports a response waiting, so a test knows one is queued. */
async function responseQueued(link: Vxi11Link): Promise<void> {
  for (let i = 0; i < 200; i++) {
    if ((await link.readStatusByte()) & MAV) return;
    await new Promise((resolve) => setTimeout(resolve, 10));
  }
  throw new Error('no response was queued within 2 s');
}

describe.skipIf(!tools)('simulated bench over VXI-11 (portmapper: rpcbind)', () => {
  let bench: SimulatedBench;
  /** The same scope record as read over the raw socket, big-endian int16 codes (the power-on format). */
  let socketTrace: number[];

  beforeAll(async () => {
    await ensurePortmapper();
    bench = await startSimulatedBench({ design: TEST_DESIGN_JSON, tcpPort: 0, timeScale: 10, seed: 5, vxi11: { maxRecvSizeBytes: SMALL_MAX_RECV_SIZE_BYTES } });
    const scope = await connect(bench.addresses.scope);
    await scope.write('SENSe:SWEep:POINts 10000');
    await scope.write('INITiate');
    await scope.operationComplete({ timeoutS: 10 });
    const block = await scope.queryBlock('TRACe:DATA? CH1');
    const view = new DataView(block.buffer, block.byteOffset, block.byteLength);
    socketTrace = Array.from({ length: block.length / 2 }, (_, i) => view.getInt16(2 * i, false));
    await scope.close();
  }, 30_000);

  afterAll(async () => {
    await bench?.stop();
  });

  it('registers its core channel with the portmapper, one server for three device names', async () => {
    expect(await getPort('127.0.0.1', DEVICE_CORE_PROGRAM, DEVICE_CORE_VERSION, 2000)).toBe(bench.vxi11Server!.corePort);
    // rpcinfo (rpcbind's own client) lists the same mapping: program 395183 = 0x0607AF, VXI-11 §B.6.
    const { stdout } = await run('rpcinfo', ['-p', '127.0.0.1']);
    expect(stdout).toMatch(new RegExp(`395183\\s+1\\s+tcp\\s+${bench.vxi11Server!.corePort}`));
    expect(bench.vxi11Addresses).toEqual({ generator: 'TCPIP::127.0.0.1::INSTR', meter: 'TCPIP::127.0.0.1::inst1::INSTR', scope: 'TCPIP::127.0.0.1::inst2::INSTR' });
  });

  it('refuses a second registration while the first server lives, as a user error with a hint', async () => {
    const refusal = await startSimulatedBench({ design: TEST_DESIGN_JSON, tcpPort: 0, vxi11: true }).catch((error: unknown) => error);
    expect(refusal).toBeInstanceOf(Vxi11RegistrationError);
    expect(refusal).toBeInstanceOf(UserError);
    expect((refusal as UserError).message).toMatch(new RegExp(`another VXI-11 server is registered with the portmapper \\(port ${bench.vxi11Server!.corePort}\\)`));
    expect((refusal as UserError).hint).toMatch(/rpcinfo -d 395183 1/);
    // rolloff sim prints it plainly: message and hint, exit code 2, no "internal error" and no stack trace.
    const cli = await run(process.execPath, [ROLLOFF_CLI, 'sim', '--design', EXAMPLE_DESIGN, '--port', '0', '--vxi11'], { timeout: 30_000 }).then(
      () => ({ code: 0, stderr: '' }),
      (error: { code: number; stderr: string }) => error,
    );
    expect(cli.code).toBe(2);
    expect(cli.stderr).toMatch(/^rolloff sim: another VXI-11 server is registered with the portmapper/);
    expect(cli.stderr).toMatch(/\n {2}Stop it, or remove a stale entry with: rpcinfo -d 395183 1/);
    expect(cli.stderr).not.toMatch(/internal error|\n\s+at /);
  });

  it('answers Rolloff\'s client on each device name with that instrument\'s *IDN?', async () => {
    for (const [role, model] of [['generator', 'simulated generator'], ['meter', 'simulated meter'], ['scope', 'simulated scope']] as const) {
      const session = await connect(bench.vxi11Addresses![role]);
      expect((await session.identify()).model).toBe(model);
      await session.close();
    }
  });

  it('pyvisa-py over VXI-11 (inst0 by default, inst1, inst2): *IDN?, -113 for an unknown header, the waveform block intact', async () => {
    for (const [role, model] of [['generator', 'simulated generator'], ['meter', 'simulated meter']] as const) {
      const out = JSON.parse((await run(toolPath('pyvisaPy')!, [PYVISA_CLIENT, bench.vxi11Addresses![role]])).stdout);
      expect(out.idn).toMatch(new RegExp(`,${model},`));
      // SCPI-1999 vol 2 §21.8.9 (recalled): −113 "Undefined header".
      expect(out.error).toMatch(/^-113,"Undefined header/);
    }
    const scope = JSON.parse((await run(toolPath('pyvisaPy')!, [PYVISA_CLIENT, bench.vxi11Addresses!.scope, 'TRACe:DATA? CH1'])).stdout);
    expect(scope.idn).toMatch(/,simulated scope,/);
    expect(scope.error).toMatch(/^-113,/);
    expect(scope.trace).toHaveLength(10_000);
    expect(scope.trace).toEqual(socketTrace);
  }, 30_000);

  it('pyvisa-py over the raw socket (TCPIP::127.0.0.1::PORT::SOCKET) reads the same', async () => {
    const port = bench.addresses.scope.split(':').pop();
    const out = JSON.parse((await run(toolPath('pyvisaPy')!, [PYVISA_CLIENT, `TCPIP::127.0.0.1::${port}::SOCKET`, 'TRACe:DATA? CH1'])).stdout);
    expect(out.idn).toMatch(/,simulated scope,/);
    expect(out.error).toMatch(/^-113,"Undefined header/);
    expect(out.trace).toEqual(socketTrace);
  }, 30_000);

  it.skipIf(!hasLxi)('lxi-tools reads *IDN? of the default device inst0 (the generator)', async () => {
    const { stdout } = await run('lxi', ['scpi', '--address', '127.0.0.1', '*IDN?'], { timeout: 15_000 });
    expect(stdout).toMatch(/simulated bench \(simulated\),simulated generator,/);
  }, 20_000);

  it('reads a long block in several device_read calls and writes in several device_write calls (small sizes)', async () => {
    const transport = new Vxi11Transport({ host: '127.0.0.1', device: 'inst2', readChunkBytes: 4096 });
    const session = await ScpiSession.open(transport);
    expect(transport.maxRecvSize).toBe(SMALL_MAX_RECV_SIZE_BYTES);
    const before = transport.deviceReadCalls;
    const block = await session.queryBlock('TRACe:DATA? CH1');
    // "#520000" + 20,000 bytes + LF in requests of 4096 bytes: at least 5 calls.
    expect(transport.deviceReadCalls - before).toBeGreaterThanOrEqual(5);
    const view = new DataView(block.buffer, block.byteOffset, block.byteLength);
    expect(Array.from({ length: block.length / 2 }, (_, i) => view.getInt16(2 * i, false))).toEqual(socketTrace);
    // A 32-byte program message goes out in two 16-byte device_writes; the instrument sees one message.
    await session.write('SENSe:SWEep:TIME 2.000000000E-02');
    expect(Number(await session.query('SENSe:SWEep:TIME?'))).toBeCloseTo(0.02, 12);
    await session.close();
  }, 20_000);

  it('a dropped link fails the query in flight as a disconnect; a new link works', async () => {
    const session = await connect(bench.vxi11Addresses!.meter);
    await session.identify();
    await bench.setFault('meter', { kind: 'hang' });
    const pending = session.query('*IDN?', { timeoutS: 10 });
    await new Promise((resolve) => setTimeout(resolve, 100));
    await bench.setFault('meter', { kind: 'drop-link' });
    await expect(pending).rejects.toBeInstanceOf(ScpiDisconnectedError);
    expect(session.isOpen).toBe(false);
    await bench.setFault('meter', null);
    const again = await connect(bench.vxi11Addresses!.meter);
    expect((await again.identify()).model).toBe('simulated meter');
    await again.close();
  }, 20_000);

  it('an instrument that does not answer: the session times out; device_read itself ends with VXI-11 error 15 after io_timeout', async () => {
    const session = await connect(bench.vxi11Addresses!.meter);
    await bench.setFault('meter', { kind: 'no-reply' });
    await expect(session.query('*IDN?', { timeoutS: 0.3 })).rejects.toBeInstanceOf(ScpiTimeoutError);
    const link = await Vxi11Link.open({ host: '127.0.0.1', device: 'inst1' }, 'test link');
    await link.write(new TextEncoder().encode('*IDN?\n'), true, 1);
    const started = performance.now();
    await expect(link.read(1024, 0.4)).rejects.toBeInstanceOf(ScpiTimeoutError);
    expect(performance.now() - started).toBeGreaterThanOrEqual(390);
    await bench.setFault('meter', null);
    // device_clear empties what the instrument holds; the link then works as new.
    await link.clear();
    await link.write(new TextEncoder().encode('*IDN?\n'), true, 1);
    expect(new TextDecoder().decode((await link.read(1024, 2)).data)).toMatch(/simulated meter/);
    await link.destroy();
    await session.close();
  }, 20_000);

  it('device_clear drops a response not yet read: the next query reads its own reply, not the stale one', async () => {
    const { link, send, readText } = await meterLink();
    await send('*CLS');
    // Control, no clear: a response left unread is what the next query's read gets.
    await send('*IDN?');
    await responseQueued(link);
    await send('SYSTem:ERRor?');
    expect(await readText()).toMatch(/simulated meter/);
    expect(await readText()).toBe('0,"No error"');
    // With a clear in between, the queued *IDN? response is gone (MAV falls, IEEE 488.2 §11.2 bit 4, recalled).
    await send('*IDN?');
    await responseQueued(link);
    await link.clear();
    expect(await link.readStatusByte() & MAV).toBe(0);
    await send('SYSTem:ERRor?');
    expect(await readText()).toBe('0,"No error"');
    await link.destroy();
  }, 20_000);

  it('device_clear drops a partial command in the input buffer: what follows is parsed on its own', async () => {
    const { link, send, readText } = await meterLink();
    await send('*CLS');
    // Control, no clear: "SYSTem:ERR" without END joins the next write into one unknown header, −113 and no reply.
    await send('SYSTem:ERR', false);
    await send('*IDN?');
    await expect(link.read(1024, 0.5)).rejects.toBeInstanceOf(ScpiTimeoutError);
    await send('SYSTem:ERRor?');
    expect(await readText()).toMatch(/^-113,"Undefined header/);
    // With a clear after the partial command, *IDN? arrives alone and no error is queued.
    await send('SYSTem:ERR', false);
    await link.clear();
    await send('*IDN?');
    expect(await readText()).toMatch(/simulated meter/);
    await send('SYSTem:ERRor?');
    expect(await readText()).toBe('0,"No error"');
    await link.destroy();
  }, 20_000);

  it('device_read with a term char stops after it with reason CHR; END only on the last piece; REQCNT on a full request', async () => {
    const link = await Vxi11Link.open({ host: '127.0.0.1', device: 'inst1' }, 'test link');
    const decode = (bytes: Uint8Array) => new TextDecoder().decode(bytes);
    await link.write(new TextEncoder().encode('*IDN?'), true, 2);
    const whole = await link.read(1024, 2);
    expect(whole.reason).toBe(Reason.end);
    // *IDN? has four fields (IEEE 488.2 §10.14, recalled): three commas, so four pieces.
    await link.write(new TextEncoder().encode('*IDN?'), true, 2);
    const pieces = [];
    for (let i = 0; i < 10; i++) {
      const piece = await link.read(1024, 2, undefined, ','.charCodeAt(0));
      pieces.push(piece);
      if (piece.reason & Reason.end) break;
    }
    expect(pieces.map((p) => p.reason)).toEqual([Reason.termChar, Reason.termChar, Reason.termChar, Reason.end]);
    pieces.slice(0, 3).forEach((p) => expect(decode(p.data)).toMatch(/,$/));
    expect(pieces.map((p) => decode(p.data)).join('')).toBe(decode(whole.data));
    // A request smaller than the response: REQCNT, the rest in the next read.
    await link.write(new TextEncoder().encode('*IDN?'), true, 2);
    const first = await link.read(8, 2);
    expect(first.reason).toBe(Reason.requestCount);
    expect(first.data).toHaveLength(8);
    const rest = await link.read(1024, 2);
    expect(rest.reason).toBe(Reason.end);
    expect(decode(first.data) + decode(rest.data)).toBe(decode(whole.data));
    await link.destroy();
  }, 20_000);

  it('why the transport reads to END: a block may hold any byte, so a term char would stop a block read inside the block', async () => {
    const blockBytes = new Uint8Array(socketTrace.length * 2);
    const view = new DataView(blockBytes.buffer);
    socketTrace.forEach((code, i) => view.setInt16(2 * i, code, false));
    const message = new Uint8Array([...new TextEncoder().encode(`#5${String(blockBytes.length).padStart(5, '0')}`), ...blockBytes, 0x0a]);
    // Whatever byte is chosen as term char, a record can hold it: take one from the middle of this one.
    const termChar = blockBytes[blockBytes.length >> 1];
    const link = await Vxi11Link.open({ host: '127.0.0.1', device: 'inst2' }, 'test link');
    await link.write(new TextEncoder().encode('TRACe:DATA? CH1'), true, 5);
    const piece = await link.read(1 << 20, 5, undefined, termChar);
    expect(piece.reason).toBe(Reason.termChar);
    expect(piece.data).toEqual(message.subarray(0, message.indexOf(termChar) + 1));
    expect(piece.data.length).toBeLessThan(message.length);
    await link.clear();
    await link.destroy();
    // The transport (no term char) reads the same block whole.
    const session = await connect(bench.vxi11Addresses!.scope);
    expect(await session.queryBlock('TRACe:DATA? CH1')).toEqual(blockBytes);
    await session.close();
  }, 20_000);

  /*
   * After a session query timed out, the next query gets its own reply. Sent after a pause, the
   * late response sits in the instrument's output buffer (the transport's device_clear drops it);
   * sent at once, the earlier device_read is still ending with error 15 (its failure must reach
   * only the query it belongs to).
   */
  it.each([
    ['sent once the late reply has come', 800],
    ['sent at once', 0],
  ])('a query after a timed-out one (%s) gets its own reply', async (_when, pauseMs) => {
    const session = await connect(bench.vxi11Addresses!.meter);
    await session.clearStatus();
    await bench.setFault('meter', { kind: 'slow', delayS: 0.6 });
    await expect(session.query('*IDN?', { timeoutS: 0.2 })).rejects.toBeInstanceOf(ScpiTimeoutError);
    await bench.setFault('meter', null);
    if (pauseMs > 0) await new Promise((resolve) => setTimeout(resolve, pauseMs));
    expect(await session.query('SYSTem:ERRor?')).toBe('0,"No error"');
    expect((await session.identify()).model).toBe('simulated meter');
    await session.close();
  }, 20_000);

  it('device_abort on the abort channel ends a waiting read with VXI-11 error 23', async () => {
    await bench.setFault('meter', { kind: 'no-reply' });
    const link = await Vxi11Link.open({ host: '127.0.0.1', device: 'inst1' }, 'test link');
    await link.write(new TextEncoder().encode('*IDN?\n'), true, 1);
    const reading = link.read(1024, 10);
    await new Promise((resolve) => setTimeout(resolve, 100));
    await link.abort();
    const error = await reading.catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ScpiLinkError);
    expect((error as ScpiLinkError).code).toBe(23);
    await bench.setFault('meter', null);
    await link.destroy();
  }, 20_000);

  it('a lock held by another link: the other waits lock_timeout, then a lock error; after unlock it goes through', async () => {
    const holder = new Vxi11Transport({ host: '127.0.0.1', device: 'inst1' });
    const other = new Vxi11Transport({ host: '127.0.0.1', device: 'inst1', lockTimeoutS: 0.3 });
    await holder.open();
    const otherSession = await ScpiSession.open(other);
    await holder.lock();
    const started = performance.now();
    await expect(otherSession.query('*IDN?')).rejects.toBeInstanceOf(ScpiLockedError);
    expect(performance.now() - started).toBeGreaterThanOrEqual(290);
    await holder.unlock();
    expect(await otherSession.query('*IDN?')).toMatch(/simulated meter/);
    await otherSession.close();
    await holder.close();
  }, 20_000);

  it('device_lock while another link holds the lock: waits lock_timeout then a named lock error; 0 fails at once; a lock freed during the wait is taken', async () => {
    const holder = new Vxi11Transport({ host: '127.0.0.1', device: 'inst1' });
    const other = new Vxi11Transport({ host: '127.0.0.1', device: 'inst1', lockTimeoutS: 0.3 });
    await holder.open();
    await other.open();
    await holder.lock();
    let started = performance.now();
    const refused = await other.lock().catch((e: unknown) => e);
    expect(performance.now() - started).toBeGreaterThanOrEqual(290);
    expect(refused).toBeInstanceOf(ScpiLockedError);
    expect((refused as ScpiLockedError).message).toMatch(/locked by another connection \(device_lock, waited 0\.3 s\)/);
    expect((refused as ScpiLockedError).lockTimeoutS).toBe(0.3);
    // lock_timeout 0: no waitlock flag, refused at once (well under the 0.3 s wait above).
    started = performance.now();
    await expect(other.lock(0)).rejects.toBeInstanceOf(ScpiLockedError);
    expect(performance.now() - started).toBeLessThan(290);
    // A lock released while the other link waits for it is taken then (not at the end of the 5 s wait), not refused.
    started = performance.now();
    const waiting = other.lock(5);
    await new Promise((resolve) => setTimeout(resolve, 100));
    await holder.unlock();
    await waiting;
    expect(performance.now() - started).toBeLessThan(2500);
    // Now the first link is the one kept out: its write (lock_timeout 0) fails with the lock error, not a hang.
    const holderSession = new ScpiSession(holder);
    await expect(holderSession.write('*CLS')).rejects.toBeInstanceOf(ScpiLockedError);
    await other.unlock();
    await holderSession.write('*CLS');
    await holder.close();
    await other.close();
  }, 20_000);

  it('an unknown device name is refused at create_link with VXI-11 error 3, named', async () => {
    const error = await connect('TCPIP::127.0.0.1::inst9::INSTR').catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ScpiLinkError);
    expect((error as ScpiLinkError).code).toBe(3);
    expect((error as Error).message).toMatch(/create_link to "inst9" failed: VXI-11 error 3 \(device not accessible\)/);
  });
});

/**
 * The same sweep of the same simulated build over the raw socket and over
 * VXI-11 (after the bench above has stopped and unregistered: one
 * registration at a time). The transport must not change what is measured:
 * at every frequency the two gains differ by no more than the combined
 * stated standard uncertainty, times 3 (a 3σ bound, common practice, no
 * source), plus the 0.1 % settling residual the plan allows on each side.
 */
describe.skipIf(!tools)('a full sweep over VXI-11 agrees with the same sweep over TCP', () => {
  const folder = tempFolder();
  const runs: Partial<Record<'tcp' | 'vxi11', RunDetail>> = {};

  beforeAll(async () => {
    await ensurePortmapper();
    for (const [link, seed] of [['tcp', 3], ['vxi11', 4]] as const) {
      // Different noise seeds: the two runs are independent measurements of the same build.
      const service = await openServiceAt(join(folder.path, `${link}.sqlite`), { maxStimulusVpp: 1, simulatedBench: { timeScale: 50, noiseVrms: 1e-4, link, seed } });
      try {
        const design = await service.saveDesign(invertingGain100());
        const build = await service.createBuild({ designId: design.id, label: 'gain 100', notes: '', actualValues: {} });
        await service.startSimulatedBenchForBuild(build.id);
        const status = await service.benchStatus();
        if (link === 'vxi11') expect(Object.values(status.simulatedBench!.addresses).every((a) => /^TCPIP::127\.0\.0\.1::/.test(a!))).toBe(true);
        const run = await service.startRun(sweepRequest(build.id, { refine: false }));
        expect(await service.waitForRun(run.id)).toBe('done');
        runs[link] = await service.getRun(run.id);
      } finally {
        await service.close();
      }
    }
  }, 120_000);

  afterAll(() => folder.remove());

  it('measures the same frequencies, with gains within the combined 3σ uncertainty (+ settling residual)', () => {
    const tcp = runs.tcp!;
    const vxi11 = runs.vxi11!;
    expect(vxi11.points.stimulus).toEqual(tcp.points.stimulus);
    const settleResidualDb = 20 * Math.log10(1.001); // e^−6.9 ≈ 0.1 % residual transient (plan settle rule)
    let compared = 0;
    tcp.points.stimulus.forEach((f, i) => {
      if ((tcp.points.flags[i] | vxi11.points.flags[i]) & PointFlag.distorted) return;
      const combinedU = Math.hypot(tcp.points.gainUncertaintyDb[i], vxi11.points.gainUncertaintyDb[i]);
      expect(Math.abs(tcp.points.gainDb[i] - vxi11.points.gainDb[i]), `at ${f} Hz`).toBeLessThanOrEqual(3 * combinedU + 2 * settleResidualDb);
      compared++;
    });
    expect(compared).toBeGreaterThan(15);
    expect(Math.abs(vxi11.figures.gainLimitHz! / tcp.figures.gainLimitHz! - 1)).toBeLessThan(0.05);
  });
});

/** `rolloff sim --vxi11` as a user starts it: it prints the resource strings, serves them, and unregisters on Ctrl-C. */
describe.skipIf(!tools)('rolloff sim --vxi11', () => {
  it('prints the VXI-11 resource strings, answers on them, and leaves the portmapper clean when stopped', async () => {
    await ensurePortmapper();
    const sim = await startSimProcess(['--design', join(__dirname, '../../../app/circuit/examples/inverting-lowpass.json'), '--port', '0', '--vxi11']);
    try {
      expect(sim.addresses.vxi11).toEqual({ generator: 'TCPIP::127.0.0.1::INSTR', meter: 'TCPIP::127.0.0.1::inst1::INSTR', scope: 'TCPIP::127.0.0.1::inst2::INSTR' });
      const session = await connect(sim.addresses.vxi11.scope!);
      expect((await session.identify()).model).toBe('simulated scope');
      await session.close();
    } finally {
      sim.stop();
      await new Promise((resolve) => sim.process.once('exit', resolve));
    }
    expect(await getPort('127.0.0.1', DEVICE_CORE_PROGRAM, DEVICE_CORE_VERSION, 2000)).toBe(0);
  }, 30_000);
});
