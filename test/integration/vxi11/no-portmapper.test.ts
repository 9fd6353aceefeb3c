/**
 * `rolloff sim --vxi11` on a machine where no portmapper answers: it says so
 * in plain words with what to do (exit code 2), never "internal error". Run
 * in a network namespace of its own (unshare -n, as root), whose loopback has
 * nothing listening on port 111, so the system's portmapper is left alone.
 * Expected wording is our own (app/sim/vxi11-server.ts), no outside source.
 */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { requireTool, toolPath } from '../../helpers/required-tool';

const ROLLOFF_CLI = join(__dirname, '../../../app/cli/bin.mjs');
const EXAMPLE_DESIGN = join(__dirname, '../../../app/circuit/examples/inverting-lowpass.json');

/** A namespace needs CAP_SYS_ADMIN: without it the check cannot run here, and says so. */
function canMakeNetworkNamespace(): boolean {
  const probe = spawnSync(toolPath('unshare')!, ['-n', 'true'], { encoding: 'utf8' });
  if (probe.status === 0) return true;
  console.warn(`SKIPPED: cannot make a network namespace (unshare -n: ${probe.stderr.trim() || probe.error?.message}); run the tests as root.`);
  return false;
}

const ready = requireTool('unshare', 'ip') && canMakeNetworkNamespace();

describe.skipIf(!ready)('rolloff sim --vxi11 with no portmapper', () => {
  it('prints the plain message and hint, exit code 2, no internal error', () => {
    const script = `${toolPath('ip')} link set lo up && exec "$0" "$@"`;
    const result = spawnSync(
      toolPath('unshare')!,
      ['-n', 'sh', '-c', script, process.execPath, ROLLOFF_CLI, 'sim', '--design', EXAMPLE_DESIGN, '--port', '0', '--vxi11'],
      { encoding: 'utf8', timeout: 30_000 },
    );
    expect(result.status, result.stderr).toBe(2);
    expect(result.stderr).toMatch(/^rolloff sim: cannot reach the portmapper on 127\.0\.0\.1:111 \(.*ECONNREFUSED.*\); VXI-11 clients find instruments through it\n/);
    expect(result.stderr).toMatch(/\n {2}Start it \(Debian: apt-get install rpcbind; then rpcbind -w, or systemctl start rpcbind\), or leave out --vxi11/);
    expect(result.stderr).not.toMatch(/internal error|\n\s+at /);
    expect(result.stdout).not.toMatch(/Press Ctrl-C/);
  });
});
