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
    expect(lines[0]).toMatch(/^PATH\s+USB VID:PID\s+SERIAL NUMBER\s+MANUFACTURER$/);
    expect(lines.slice(1, 4).map((line) => line.split(/\s{2,}/))).toEqual([
      ['/dev/ttyACM0', '1209:0002', 'TEST-INSTRUMENT-42', '-'],
      ['/dev/ttyS0', '-', '-', '-'],
      ['/dev/ttyUSB0', '1209:0001', 'TEST-ADAPTER-7', 'Invented Test Fixture'],
    ]);
    expect(lines).toHaveLength(5);
    expect(lines[4]).toMatch(/^Note: udevadm not found, so ports were read from the kernel/);
  });

  it('--json carries the same ports and the note', () => {
    const result = ports({ ROLLOFF_SYSFS_ROOT: sysfs.root }, '--json');
    expect(result.status).toBe(0);
    const listing = JSON.parse(result.stdout) as { ports: Array<{ path: string }>; incomplete: string };
    expect(listing.ports.map((p) => p.path)).toEqual(['/dev/ttyACM0', '/dev/ttyS0', '/dev/ttyUSB0']);
    expect(listing.incomplete).toMatch(/udevadm not found/);
  });

  it('on this machine\'s own /sys it works too, never "internal error"', () => {
    const result = ports({});
    expect(result.status).toBe(0);
    expect(`${result.stdout}${result.stderr}`).not.toMatch(/internal error|ENOENT/);
    expect(result.stdout).toMatch(/^(PATH|No serial ports found)/);
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
    expect(result.stdout).toMatch(/^No serial ports found\./);
    expect(result.stdout).toMatch(/Note: .*could not read .*class\/tty \(ENOENT\)/);
  });
});
