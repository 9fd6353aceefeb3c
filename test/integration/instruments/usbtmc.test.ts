/**
 * USBTMC through the kernel driver's device node: resource strings resolved
 * against a fake sysfs tree laid out as the kernel lays out /sys
 * (test/helpers/fake-sysfs.ts), the node's read/write semantics through a
 * stand-in for the driver's character device (test/helpers/usbtmc-stand-in.ts)
 * with a simulated scope behind it, and the messages a user gets when the
 * instrument is missing, its node is missing, or the node is not theirs.
 * Expected replies: what the same simulated scope answers over its raw TCP
 * socket (app/sim), not values written here.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseDesign } from '../../../app/circuit';
import { scaledClock } from '../../../app/bench/clock';
import { ScpiDisconnectedError, ScpiSession, ScpiTimeoutError, UsbtmcNodeMissingError, UsbtmcNotFoundError, UsbtmcPermissionError, UsbtmcTransport, parseAddress } from '../../../app/scpi';
import { BenchModel } from '../../../app/sim/bench-model';
import { CircuitUnderTest } from '../../../app/sim/circuit-under-test';
import { SimScope } from '../../../app/sim/sim-scope';
import { SIM_SOURCE_IMPEDANCE_OHM } from '../../../app/sim';
import { portsTestTree } from '../../helpers/fake-sysfs';
import { UsbtmcStandIn } from '../../helpers/usbtmc-stand-in';
import { TEST_DESIGN_JSON } from './bench-scenario';

describe('USBTMC over the kernel driver\'s device node', () => {
  const sysfs = portsTestTree();
  const clock = scaledClock(10);
  const scope = new SimScope(new BenchModel(new CircuitUnderTest(parseDesign(TEST_DESIGN_JSON, 'test design'), SIM_SOURCE_IMPEDANCE_OHM), clock, 0, 3), clock);
  const standIn = new UsbtmcStandIn(scope, { '/dev/usbtmc0': 'ok', '/dev/usbtmc1': 'no-permission' }, 400);
  const address = parseAddress('USB0::0x1209::0x0003::TEST-TMC-9::INSTR');
  let session: ScpiSession;
  let transport: UsbtmcTransport;

  beforeAll(async () => {
    if (address.kind !== 'usbtmc') throw new Error('not a USBTMC address');
    transport = new UsbtmcTransport({ ids: address, sysfsRoot: sysfs.root, openNode: standIn.open, readChunkBytes: 4096 });
    session = await ScpiSession.open(transport);
  });

  afterAll(async () => {
    await session?.close();
    sysfs.remove();
  });

  it('finds /dev/usbtmc0 from vendor, product and serial number in sysfs', () => {
    expect(transport.devicePath).toBe('/dev/usbtmc0');
  });

  it('answers *IDN? and an unknown header queues -113 (one write = one message, one read = one response)', async () => {
    expect((await session.identify()).model).toBe('simulated scope');
    await session.write('NOSUCH:HEADer');
    // SCPI-1999 vol 2 §21.8.9 (recalled): −113 "Undefined header".
    expect(await session.query('SYSTem:ERRor?')).toMatch(/^-113,"Undefined header/);
  });

  it('reads a 20,000-byte block over several reads of 4096 bytes, intact', async () => {
    await session.write('SENSe:SWEep:POINts 10000');
    await session.write('INITiate');
    await session.operationComplete({ timeoutS: 5 });
    const before = standIn.readCalls;
    const block = await session.queryBlock('TRACe:DATA? CH1');
    expect(block.length).toBe(20_000);
    expect(standIn.readCalls - before).toBeGreaterThanOrEqual(5);
    // The scope's own scaling reply says how many points it holds (TRACe:SCALing? first field).
    expect(Number((await session.query('TRACe:SCALing? CH1')).split(',')[0])).toBe(10_000);
  });

  it('a response that never comes: the driver\'s ETIMEDOUT is a timeout, and the link still works after', async () => {
    standIn.faults.set({ kind: 'no-reply' });
    await expect(session.query('*IDN?', { timeoutS: 3 })).rejects.toBeInstanceOf(ScpiTimeoutError);
    standIn.faults.set(undefined);
    expect((await session.identify()).model).toBe('simulated scope');
  });

  it('an unknown serial number names the instruments the driver has, with their resource strings', async () => {
    const other = new UsbtmcTransport({ ids: { vendorId: '1209', productId: '0003', serial: 'NOT-THERE' }, sysfsRoot: sysfs.root, openNode: standIn.open });
    const error = await other.open().catch((e: unknown) => e);
    expect(error).toBeInstanceOf(UsbtmcNotFoundError);
    expect((error as Error).message).toMatch(/USB0::0x1209::0x0003::NOT-THERE::INSTR.*USB0::0x1209::0x0003::TEST-TMC-9::INSTR \(\/dev\/usbtmc0\)/);
  });

  it('a node this user may not open: the message gives the udev rule and the group', async () => {
    const other = new UsbtmcTransport({ devicePath: '/dev/usbtmc1', openNode: standIn.open });
    const error = (await other.open().catch((e: unknown) => e)) as UsbtmcPermissionError;
    expect(error).toBeInstanceOf(UsbtmcPermissionError);
    expect(error.message).toMatch(/permission denied opening \/dev\/usbtmc1/);
    expect(error.hint).toContain('SUBSYSTEM=="usbmisc", KERNEL=="usbtmc[0-9]*"');
    expect(error.hint).toMatch(/GROUP="plugdev", MODE="0660"/);
    expect(error.hint).toMatch(/usermod -aG plugdev/);
    // With the ids known, the rule names this instrument only (udev(7) ATTRS match on the parent USB device).
    const byIds = new UsbtmcPermissionError('/dev/usbtmc1', { vendorId: '1209', productId: '0003' });
    expect(byIds.udevRule).toBe('SUBSYSTEM=="usbmisc", KERNEL=="usbtmc[0-9]*", ATTRS{idVendor}=="1209", ATTRS{idProduct}=="0003", GROUP="plugdev", MODE="0660"');
  });

  it('a node that does not exist (the real file system): says so and how the node is made', async () => {
    const missing = new UsbtmcTransport({ devicePath: `${sysfs.root}/dev/usbtmc7` });
    const error = await missing.open().catch((e: unknown) => e);
    expect(error).toBeInstanceOf(UsbtmcNodeMissingError);
  });

  it('unplugged: the query in flight fails as a disconnect and the link is closed', async () => {
    standIn.faults.set({ kind: 'hang' });
    const pending = session.query('*IDN?', { timeoutS: 3 });
    await new Promise((resolve) => setTimeout(resolve, 50));
    standIn.unplug();
    await expect(pending).rejects.toBeInstanceOf(ScpiDisconnectedError);
    expect(session.isOpen).toBe(false);
    standIn.faults.set(undefined);
  });
});
