/**
 * `rolloff serve` as a user runs it: with --require-token it prints a token and
 * an address carrying it, refuses requests without it, and stops cleanly on
 * SIGTERM; off loopback (--host 0.0.0.0, reached from this machine) it does
 * the same without the flag, and on the default loopback address it serves
 * with no token; bad options are refused with a message and no stack trace.
 * Common practice, no source.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

const ROOT = resolve(__dirname, '../../..');
const dir = mkdtempSync(join(tmpdir(), 'rolloff-serve-cli-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Starts `rolloff serve` with `args`; resolves with the address it prints, its output so far and a stop that returns its exit code. */
async function startServe(args: string[]) {
  const child = spawn(process.execPath, ['app/cli/bin.mjs', 'serve', '--port', '0', ...args], { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
  let output = '';
  child.stdout.on('data', (c) => (output += c));
  child.stderr.on('data', (c) => (output += c));
  const exited = new Promise<number | null>((r) => child.on('exit', (code) => r(code)));
  const url = await new Promise<string>((resolvePromise, reject) => {
    const timer = setTimeout(() => reject(new Error(`no address printed:\n${output}`)), 30_000);
    child.stdout.on('data', () => {
      const match = /Open (http:\/\/\S+)\n/.exec(output);
      if (match) {
        clearTimeout(timer);
        resolvePromise(match[1]);
      }
    });
  });
  return {
    url,
    output: () => output,
    stop: async () => {
      child.kill('SIGTERM');
      return exited;
    },
  };
}

describe('rolloff serve', () => {
  it('prints the token, refuses requests without it and stops cleanly on SIGTERM', async () => {
    const serve = await startServe(['--require-token', '--db', join(dir, 'a.sqlite')]);
    const { url } = serve;
    expect(url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/\?token=[\w-]+$/);
    const token = new URL(url).searchParams.get('token')!;
    expect(serve.output()).toContain(`Access token: ${token}`);
    expect(serve.output()).toMatch(/Safety:/);
    const origin = new URL(url).origin;
    expect((await fetch(`${origin}/`)).status).toBe(401);
    expect((await fetch(`${origin}/api/listRuns`, { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: '[]' })).status).toBe(401);
    const page = await fetch(url);
    expect(page.status).toBe(200);
    expect(await page.text()).toMatch(/<script type="module" src="app.js">/);
    const runs = await fetch(`${origin}/api/listRuns`, { method: 'POST', headers: { 'Content-Type': 'application/json', Authorization: `Bearer ${token}` }, body: '[]' });
    expect(await runs.json()).toEqual({ result: [] });
    expect(await serve.stop()).toBe(0);
    expect(serve.output()).toMatch(/Stopping/);
  });

  it('off loopback (--host 0.0.0.0) requires the token without being asked', async () => {
    const serve = await startServe(['--host', '0.0.0.0', '--db', join(dir, 'c.sqlite')]);
    try {
      const printed = new URL(serve.url);
      const token = printed.searchParams.get('token');
      expect(token).toMatch(/^[\w-]{43}$/);
      expect(serve.output()).toContain(`Access token: ${token}`);
      const origin = `http://127.0.0.1:${printed.port}`;
      expect((await fetch(`${origin}/`)).status).toBe(401);
      expect((await fetch(`${origin}/api/listRuns`, { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: '[]' })).status).toBe(401);
      expect((await fetch(`${origin}/?token=${token}`)).status).toBe(200);
    } finally {
      expect(await serve.stop()).toBe(0);
    }
  });

  it('on the default address (loopback) serves without a token', async () => {
    const serve = await startServe(['--db', join(dir, 'd.sqlite')]);
    try {
      expect(serve.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/$/);
      expect(serve.output()).not.toMatch(/Access token/);
      expect((await fetch(serve.url)).status).toBe(200);
      const runs = await fetch(`${serve.url}api/listRuns`, { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: '[]' });
      expect(await runs.json()).toEqual({ result: [] });
    } finally {
      expect(await serve.stop()).toBe(0);
    }
  });

  it('refuses bad options with a message and exit code 2', () => {
    const cases: Array<[string[], RegExp]> = [
      [['--port', '70000'], /--port 70000 is not a TCP port/],
      [['--time-scale', '0', '--simulated'], /--time-scale: 0 is not above 0/],
      [['--max-stimulus', '-1'], /--max-stimulus: -1 Vpp is not a positive amplitude/],
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
