/**
 * `rolloff serve` as a user runs it: with --require-token it prints a token and
 * an address carrying it, refuses requests without it, and stops cleanly on
 * SIGTERM; bad options are refused with a message and no stack trace.
 * Loopback addresses only (127.0.0.1). Common practice, no source.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

const ROOT = resolve(__dirname, '../../..');
const dir = mkdtempSync(join(tmpdir(), 'rolloff-serve-cli-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('rolloff serve', () => {
  it('prints the token, refuses requests without it and stops cleanly on SIGTERM', async () => {
    const child = spawn(process.execPath, ['app/cli/bin.mjs', 'serve', '--port', '0', '--require-token', '--db', join(dir, 'a.sqlite')], { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
    let output = '';
    child.stdout.on('data', (c) => (output += c));
    child.stderr.on('data', (c) => (output += c));
    const exited = new Promise<number | null>((r) => child.on('exit', (code) => r(code)));
    const url = await new Promise<string>((resolvePromise, reject) => {
      const timer = setTimeout(() => reject(new Error(`no address printed:\n${output}`)), 30_000);
      child.stdout.on('data', () => {
        const match = /Open (http:\/\/127\.0\.0\.1:\d+\/\?token=[\w-]+)/.exec(output);
        if (match) {
          clearTimeout(timer);
          resolvePromise(match[1]);
        }
      });
    });
    const token = new URL(url).searchParams.get('token')!;
    expect(output).toContain(`Access token: ${token}`);
    expect(output).toMatch(/Safety:/);
    const origin = new URL(url).origin;
    expect((await fetch(`${origin}/`)).status).toBe(401);
    expect((await fetch(`${origin}/api/listRuns`, { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: '[]' })).status).toBe(401);
    const page = await fetch(url);
    expect(page.status).toBe(200);
    expect(await page.text()).toMatch(/<script type="module" src="app.js">/);
    const runs = await fetch(`${origin}/api/listRuns`, { method: 'POST', headers: { 'Content-Type': 'application/json', Authorization: `Bearer ${token}` }, body: '[]' });
    expect(await runs.json()).toEqual({ result: [] });
    child.kill('SIGTERM');
    expect(await exited).toBe(0);
    expect(output).toMatch(/Stopping/);
  });

  it('refuses bad options with a message and exit code 2', () => {
    const cases: Array<[string[], RegExp]> = [
      [['--port', '70000'], /--port 70000 is not a TCP port/],
      [['--time-scale', '0', '--simulated'], /--time-scale 0 must be above 0/],
      [['--max-amplitude', '-1'], /--max-amplitude -1 must be above 0 V/],
      [['--colour'], /--colour: unknown option/],
    ];
    for (const [args, message] of cases) {
      const result = spawnSync(process.execPath, ['app/cli/bin.mjs', 'serve', '--db', join(dir, 'b.sqlite'), ...args], { cwd: ROOT, encoding: 'utf8', timeout: 30_000 });
      expect(result.status, args.join(' ')).toBe(2);
      expect(result.stderr).toMatch(message);
      expect(result.stderr).not.toMatch(/\n\s+at /);
    }
  });
});
