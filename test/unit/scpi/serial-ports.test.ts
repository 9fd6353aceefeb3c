/**
 * Serial ports read from the kernel's device tree, as on a machine without
 * udev. Expected values: the fake tree's own attributes (test/helpers/fake-sysfs.ts),
 * laid out as Documentation/ABI/testing/sysfs-class-tty and sysfs-bus-usb describe.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { chmodSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { listFromSysfs, listPorts, listSerialPorts } from '../../../app/scpi/ports';
import { portsTestTree } from '../../helpers/fake-sysfs';

describe('serial ports from sysfs', () => {
  const sysfs = portsTestTree();
  afterAll(() => sysfs.remove());

  it('lists ports with hardware behind them, USB identities from the parent USB device', () => {
    const { ports, gaps } = listFromSysfs(sysfs.root);
    expect(gaps).toEqual([]);
    expect(ports).toEqual([
      { path: '/dev/ttyACM0', serialNumber: 'TEST-INSTRUMENT-42', vendorId: '1209', productId: '0002' },
      { path: '/dev/ttyS0' },
      { path: '/dev/ttyUSB0', manufacturer: 'Invented Test Fixture', serialNumber: 'TEST-ADAPTER-7', vendorId: '1209', productId: '0001' },
    ]);
  });

  it('says udevadm was missing and what that costs, in one line', async () => {
    const listing = await listPorts({ sysfsRoot: sysfs.root, platform: 'linux', searchPath: '/nonexistent-folder' });
    expect(listing.ports.map((p) => p.path)).toEqual(['/dev/ttyACM0', '/dev/ttyS0', '/dev/ttyUSB0', '/dev/usbtmc0']);
    expect(listing.incomplete).toMatch(/^udevadm not found, so ports were read from the kernel .*by-id.*\.$/);
    expect(listing.incomplete).not.toContain('\n');
  });

  it('says nothing is missing when udevadm exists and the tree is read as asked', async () => {
    const bin = sysfs.platformDevice('fake-bin');
    writeFileSync(join(bin, 'udevadm'), '#!/bin/sh\nexit 1\n');
    chmodSync(join(bin, 'udevadm'), 0o755);
    const listing = await listSerialPorts({ sysfsRoot: sysfs.root, platform: 'linux', searchPath: bin });
    expect(listing.gaps).toEqual([]);
    expect(listing.ports).toHaveLength(3);
  });

  it('an unreadable tree gives no ports and says why, never an exception', async () => {
    const listing = await listPorts({ sysfsRoot: join(sysfs.root, 'missing'), platform: 'linux', searchPath: '' });
    expect(listing.ports).toEqual([]);
    expect(listing.incomplete).toMatch(/could not read .*missing\/class\/tty \(ENOENT\), so no serial ports are listed/);
  });
});
