/**
 * `rolloff ports` as a user on a minimal machine runs it: no udevadm on PATH
 * (containers and minimal installs lack udev). It lists what the kernel
 * exposes, says in one line what it could not learn, and never reports an
 * internal error. Expected rows: the fake tree's attributes (test/helpers/fake-sysfs.ts).
 */
import { spawnSync } from 'node:child_process';
import { chmodSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { portsTestTree } from '../../helpers/fake-sysfs';
import { pathWithout } from '../../helpers/required-tool';
import { parseAddress } from '../../../app/scpi/address';

const ROOT = resolve(__dirname, '../../..');
const BIN = join(ROOT, 'app/cli/bin.mjs');

function ports(env: Record<string, string>, ...args: string[]) {
  const { ROLLOFF_SYSFS_ROOT: _, ...inherited } = process.env;
  return spawnSync(process.execPath, [BIN, 'ports', ...args], { cwd: ROOT, encoding: 'utf8', timeout: 30_000, env: { ...inherited, PATH: pathWithout(['udevadm']), ...env } });
}

describe('rolloff ports without udevadm', () => {
  const sysfs = portsTestTree();
  const bin = mkdtempSync(join(tmpdir(), 'rolloff-fake-udevadm-'));
  afterAll(() => {
    sysfs.remove();
    rmSync(bin, { recursive: true, force: true });
  });

  it('prints the kernel\'s ports with USB identities and one line on what it could not learn', () => {
    const result = ports({ ROLLOFF_SYSFS_ROOT: sysfs.root });
    expect(result.stderr).toBe('');
    expect(result.status).toBe(0);
    const lines = result.stdout.trimEnd().split('\n');
    expect(lines[0]).toMatch(/^PATH\s+USB VID:PID\s+SERIAL NUMBER\s+MANUFACTURER\s+ADDRESS$/);
    // Empty cells are "—" as in every table for people.
    expect(lines.slice(1, 5).map((line) => line.split(/\s{2,}/))).toEqual([
      ['/dev/ttyACM0', '1209:0002', 'TEST-INSTRUMENT-42', '—', 'ASRL/dev/ttyACM0::INSTR'],
      ['/dev/ttyS0', '—', '—', '—', 'ASRL/dev/ttyS0::INSTR'],
      ['/dev/ttyUSB0', '1209:0001', 'TEST-ADAPTER-7', 'Invented Test Fixture', 'ASRL/dev/ttyUSB0::INSTR'],
      // USBTMC beside the serial ports, with the resource string that finds it by USB identity.
      ['/dev/usbtmc0', '1209:0003', 'TEST-TMC-9', 'Invented Test Fixture', 'USB0::0x1209::0x0003::TEST-TMC-9::INSTR'],
    ]);
    expect(lines).toHaveLength(6);
    expect(lines[5]).toMatch(/^Note: udevadm not found, so ports were read from the kernel/);
  });

  it('--json carries the same ports and the note', () => {
    const result = ports({ ROLLOFF_SYSFS_ROOT: sysfs.root }, '--json');
    expect(result.status).toBe(0);
    const listing = JSON.parse(result.stdout) as { ports: Array<{ path: string; kind: string; address: string }>; incomplete: string };
    expect(listing.ports.map((p) => p.path)).toEqual(['/dev/ttyACM0', '/dev/ttyS0', '/dev/ttyUSB0', '/dev/usbtmc0']);
    expect(listing.ports.map((p) => p.kind)).toEqual(['serial', 'serial', 'serial', 'usbtmc']);
    // Every listed address is one the address parser accepts, naming the same device.
    expect(listing.ports.map((p) => parseAddress(p.address))).toEqual([
      { kind: 'serial', serial: expect.objectContaining({ path: '/dev/ttyACM0' }) },
      { kind: 'serial', serial: expect.objectContaining({ path: '/dev/ttyS0' }) },
      { kind: 'serial', serial: expect.objectContaining({ path: '/dev/ttyUSB0' }) },
      { kind: 'usbtmc', vendorId: '1209', productId: '0003', serial: 'TEST-TMC-9' },
    ]);
    expect(listing.incomplete).toMatch(/udevadm not found/);
  });

  it('on this machine\'s own /sys it works too, never "internal error"', () => {
    const result = ports({});
    expect(result.status).toBe(0);
    expect(`${result.stdout}${result.stderr}`).not.toMatch(/internal error|ENOENT/);
    expect(result.stdout).toMatch(/^(PATH|No serial ports or USBTMC instruments found)/);
    expect(result.stdout).toMatch(/\nNote: udevadm not found/);
  });

  it('when udev\'s helper exists but fails, it falls back to the kernel and says so', () => {
    // Present on PATH but cannot start (its interpreter is missing): the serialport library's spawn fails with ENOENT.
    writeFileSync(join(bin, 'udevadm'), '#!/nonexistent/interpreter\n');
    chmodSync(join(bin, 'udevadm'), 0o755);
    const result = ports({ PATH: `${bin}:${pathWithout(['udevadm'])}` });
    expect(result.status).toBe(0);
    expect(result.stdout).not.toMatch(/internal error/);
    expect(result.stdout).toMatch(/\nNote: udev's port list failed \(spawn udevadm ENOENT\), so ports were read from the kernel only\.\n$/);
  });

  it('with no readable tree it says there are none and why', () => {
    const result = ports({ ROLLOFF_SYSFS_ROOT: join(sysfs.root, 'missing') });
    expect(result.status).toBe(0);
    expect(result.stdout).toMatch(/^No serial ports or USBTMC instruments found\./);
    expect(result.stdout).toMatch(/Note: .*could not read .*class\/tty \(ENOENT\)/);
  });
});
