/**
 * The instrument commands as a user runs them: `rolloff sim` in its own
 * process (TCP on 127.0.0.1), then `identify` and `query` against it, and bad
 * input refused with a message and no stack trace (exit 2).
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { writeFileSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { TEST_DESIGN_JSON } from './bench-scenario';
import { connect } from '../../../app/scpi';

const ROOT = resolve(__dirname, '../../..');
const BIN = join(ROOT, 'app/cli/bin.mjs');

function rolloff(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const result = spawnSync(process.execPath, [BIN, ...args], { cwd: ROOT, encoding: 'utf8', timeout: 30_000 });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

describe('rolloff sim / identify / query', () => {
  let dir: string;
  let sim: ChildProcess;
  let simOutput = '';
  let addresses: Record<string, string> = {};

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'rolloff-cli-'));
    const designPath = join(dir, 'design.json');
    writeFileSync(designPath, JSON.stringify(TEST_DESIGN_JSON));
    sim = spawn(process.execPath, [BIN, 'sim', '--design', designPath, '--port', '0', '--time-scale', '10'], { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
    sim.stdout!.on('data', (chunk: Buffer) => (simOutput += chunk.toString()));
    sim.stderr!.on('data', (chunk: Buffer) => (simOutput += chunk.toString()));
    const deadline = Date.now() + 20_000;
    while (!simOutput.includes('Ctrl-C')) {
      if (Date.now() > deadline || sim.exitCode !== null) throw new Error(`sim did not start:\n${simOutput}`);
      await new Promise((r) => setTimeout(r, 50));
    }
    for (const match of simOutput.matchAll(/^\s+(generator|meter|scope)\s+(tcp:\/\/\S+)/gm)) addresses[match[1]] = match[2];
  });

  afterAll(async () => {
    if (sim && sim.exitCode === null) {
      sim.kill('SIGINT');
      await new Promise((r) => sim.once('exit', r));
    }
    rmSync(dir, { recursive: true, force: true });
  });

  it('sim prints three loopback addresses and says the bench is simulated', () => {
    expect(simOutput).toMatch(/SIMULATED/);
    expect(Object.keys(addresses).sort()).toEqual(['generator', 'meter', 'scope']);
    for (const address of Object.values(addresses)) expect(address).toMatch(/^tcp:\/\/127\.0\.0\.1:\d+$/);
  });

  it('identify prints the *IDN? fields and reports then clears the error queue', async () => {
    // Put an error in the queue first (and leave it there), so identify has something to report.
    const session = await connect(addresses.meter);
    await session.write('NOT:A:COMMAND');
    await session.operationComplete();
    await session.close();
    const result = rolloff('identify', addresses.meter);
    expect(result.status).toBe(0);
    expect(result.stdout).toMatch(/Manufacturer:\s+Rolloff simulated bench \(simulated\)/);
    expect(result.stdout).toMatch(/Model:\s+simulated meter/);
    expect(result.stdout).toMatch(/Error queue:\s+1 entry/);
    expect(result.stdout).toMatch(/-113,"Undefined header/);
    expect(rolloff('identify', addresses.meter).stdout).toMatch(/Error queue:\s+empty/);
  });

  it('query sends each command in order, prints replies and blocks, and exits 0 with an empty error queue', () => {
    const result = rolloff('query', addresses.generator, 'SOURce:FREQuency 2500', 'SOURce:FREQuency?', 'SOURce:FUNCtion DC;FUNCtion?', '*OPC?');
    expect(result.status).toBe(0);
    expect(result.stdout).toContain('> SOURce:FREQuency 2500');
    expect(result.stdout).toContain('+2.50000000E+03');
    expect(result.stdout).toMatch(/> SOURce:FUNCtion DC;FUNCtion\?\nDC\n/);
    expect(result.stdout).toContain('Error queue: empty');
    const block = rolloff('query', addresses.scope, 'INITiate', '*OPC?', 'TRACe:DATA? CH1');
    expect(block.stdout).toMatch(/<block of 4000 bytes>/);
  });

  it('query reports a query the instrument did not understand, and its queued error, exit 3', () => {
    const result = rolloff('query', addresses.generator, 'SOURce:WOBBle?', '--timeout', '0.3');
    expect(result.status).toBe(3);
    expect(result.stdout).toContain('(no reply within 0.3 s)');
    expect(result.stdout).toMatch(/-113,"Undefined header/);
  });

  it('bad addresses and unreachable instruments give a message and hint, no stack trace, exit 2', () => {
    const bad = rolloff('identify', 'gpib0::7::INSTR');
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/not a recognised address form/);
    expect(bad.stderr).toMatch(/Accepted forms/);
    expect(bad.stderr).not.toMatch(/\bat .*\.ts:\d+/);
    const refused = rolloff('identify', 'tcp://127.0.0.1:1');
    expect(refused.status).toBe(2);
    expect(refused.stderr).toMatch(/cannot open tcp:\/\/127\.0\.0\.1:1/);
    const noPort = rolloff('identify', 'serial:///dev/rolloff-no-such-port', '--bauds', '9600,19200');
    expect(noPort.status).toBe(2);
    expect(noPort.stderr).toMatch(/cannot open serial/);
    const noDesign = rolloff('sim', '--port', '0');
    expect(noDesign.status).toBe(2);
    expect(noDesign.stderr).toMatch(/--design: is required/);
  });

  it('sim stops cleanly on Ctrl-C (SIGINT)', async () => {
    sim.kill('SIGINT');
    const code = await new Promise((r) => sim.once('exit', r));
    expect(code).toBe(0);
    expect(simOutput).toContain('Simulated bench stopped.');
  });
});
