/**
 * The web host with the real service on a temp SQLite file: the token is
 * required on every HTTP and WebSocket request when token mode is on (bound to
 * 127.0.0.2 — still loopback, never another address — with the mode forced),
 * and malformed calls get a 400 with a clear message while the database files
 * stay byte-for-byte unchanged. Status codes follow RFC 9110 (401, 403, 405,
 * 413, 415) and RFC 6455 for the refused WebSocket handshake.
 *
 * The default, with no token mode given (our own rule, app/host/web-host.ts):
 * a host bound to anything but loopback requires the token — shown on the
 * wildcard address and on this machine's own non-loopback address, reached
 * from this machine only — and a loopback host (127.0.0.0/8, ::1, localhost)
 * serves without one. Loopback per RFC 1122 §3.2.1.3 (127/8) and RFC 4291
 * §2.5.3 (::1).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { request as httpRequest } from 'node:http';
import { networkInterfaces, tmpdir } from 'node:os';
import { join } from 'node:path';
import WebSocket from 'ws';
import { startWebHost, type WebHost } from '../../../app/host/web-host';
import { isLoopbackHost } from '../../../app/host/access-token';
import { openHostedService, type HostedService } from '../../../app/host/hosted-service';
import type { RendererFiles } from '../../../app/host/renderer-bundle';

/** A tiny stand-in page: these tests are about access and calls, not the views (the e2e test serves the real bundle). */
const FILES: RendererFiles = new Map([
  ['index.html', { contentType: 'text/html; charset=utf-8', body: Buffer.from('<!doctype html><title>Rolloff</title>') }],
  ['app.js', { contentType: 'text/javascript; charset=utf-8', body: Buffer.from('export {};') }],
]);

const GOOD_DESIGN = {
  name: 'RC low-pass (invented example)',
  input: 'in',
  output: 'out',
  parts: [
    { id: 'RN', type: 'resistor', nodes: ['in', 'inv'], value: '1k' },
    { id: 'RF', type: 'resistor', nodes: ['inv', 'out'], value: '10k' },
    { id: 'CF', type: 'capacitor', nodes: ['inv', 'out'], value: '15n' },
    { id: 'U1', type: 'opamp', nodes: ['0', 'inv', 'out'], model: { openLoopGain: 1e5, gbw: 1e6 } },
  ],
};

interface Reply {
  status: number;
  headers: Record<string, string | string[] | undefined>;
  body: string;
}

function send(url: string, options: { method?: string; headers?: Record<string, string>; body?: string | Buffer } = {}): Promise<Reply> {
  return new Promise((resolvePromise, reject) => {
    const req = httpRequest(url, { method: options.method ?? 'GET', headers: options.headers }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => resolvePromise({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks).toString('utf8') }));
    });
    req.on('error', reject);
    req.end(options.body);
  });
}

function call(base: string, method: string, body: unknown, headers: Record<string, string> = {}): Promise<Reply> {
  return send(new URL(`api/${method}`, base).href, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json', ...headers },
    body: typeof body === 'string' ? body : JSON.stringify(body),
  });
}

function errorOf(reply: Reply): { name: string; message: string; hint?: string } {
  return JSON.parse(reply.body).error;
}

function websocketOutcome(url: string, headers: Record<string, string> = {}): Promise<{ opened: true; socket: WebSocket } | { opened: false; status: number }> {
  return new Promise((resolvePromise) => {
    const socket = new WebSocket(url, { headers });
    socket.once('open', () => resolvePromise({ opened: true, socket }));
    socket.once('unexpected-response', (_req, res) => {
      resolvePromise({ opened: false, status: res.statusCode ?? 0 });
      socket.terminate();
    });
    socket.once('error', () => undefined);
  });
}

describe('web host in token mode (127.0.0.2, token forced)', () => {
  let dir: string;
  let hosted: HostedService;
  let host: WebHost;
  let base: string;

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'rolloff-host-'));
    hosted = await openHostedService(join(dir, 'bench.sqlite'));
    host = await startWebHost({ api: hosted.api, subscribe: hosted.subscribe, files: FILES, host: '127.0.0.2', port: 0, requireToken: true, log: () => {} });
    base = `http://127.0.0.2:${host.port}/`;
  });
  afterAll(async () => {
    await host?.close();
    await hosted?.close();
    rmSync(dir, { recursive: true, force: true });
  });

  it('prints a URL carrying a long random token', () => {
    expect(host.token).toMatch(/^[A-Za-z0-9_-]{43}$/);
    expect(host.url).toBe(`${base}?token=${host.token}`);
  });

  it('refuses pages and calls without the token (401) or with a wrong one (403)', async () => {
    expect((await send(base)).status).toBe(401);
    expect((await send(new URL('app.js', base).href)).status).toBe(401);
    expect((await send(`${base}?token=${'x'.repeat(43)}`)).status).toBe(403);
    const noToken = await call(base, 'listDesigns', []);
    expect(noToken.status).toBe(401);
    expect(errorOf(noToken).hint).toMatch(/rolloff serve/);
    expect((await call(base, 'listDesigns', [], { Authorization: 'Bearer wrong' })).status).toBe(403);
    expect((await call(base, 'listDesigns', [], { Cookie: 'rolloff_token=wrong' })).status).toBe(403);
  });

  it('admits the token in the URL, then by cookie and by bearer header', async () => {
    const page = await send(host.url);
    expect(page.status).toBe(200);
    expect(String(page.headers['set-cookie'])).toMatch(new RegExp(`rolloff_token=${host.token}; HttpOnly; SameSite=Strict`));
    expect(page.headers['content-security-policy']).toMatch(/default-src 'self'/);
    expect((await send(new URL('app.js', base).href, { headers: { Cookie: `rolloff_token=${host.token}` } })).status).toBe(200);
    const designs = await call(base, 'listDesigns', [], { Authorization: `Bearer ${host.token}` });
    expect(designs.status).toBe(200);
    expect(JSON.parse(designs.body)).toEqual({ result: [] });
  });

  it('refuses the event WebSocket without the token and delivers events with it', async () => {
    const eventsUrl = `ws://127.0.0.2:${host.port}/events`;
    expect(await websocketOutcome(eventsUrl)).toEqual({ opened: false, status: 401 });
    expect(await websocketOutcome(eventsUrl, { Cookie: 'rolloff_token=nope' })).toEqual({ opened: false, status: 403 });
    const outcome = await websocketOutcome(eventsUrl, { Cookie: `rolloff_token=${host.token}` });
    expect(outcome.opened).toBe(true);
    if (!outcome.opened) return;
    const message = new Promise<string>((r) => outcome.socket.once('message', (data) => r(String(data))));
    const reply = await call(base, 'setMaxStimulus', [1.5], { Authorization: `Bearer ${host.token}` });
    expect(reply.status).toBe(200);
    expect(JSON.parse(await message)).toMatchObject({ event: 'bench', payload: { maxStimulusVpp: 1.5 } });
    outcome.socket.close();
  });
});

describe('web host on loopback: malformed calls', () => {
  let dir: string;
  let dbPath: string;
  let hosted: HostedService;
  let host: WebHost;
  let base: string;

  // The database file and its write-ahead log hold every write; the -shm file is SQLite's shared index of the
  // log, where readers also record their read marks (SQLite's "WAL-mode file format" page), so reads change it.
  const databaseDigest = () =>
    ['', '-wal']
      .map((suffix) => dbPath + suffix)
      .filter((path) => existsSync(path))
      .map((path) => `${path}:${createHash('sha256').update(readFileSync(path)).digest('hex')}`)
      .join('\n');

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'rolloff-host-'));
    dbPath = join(dir, 'bench.sqlite');
    hosted = await openHostedService(dbPath);
    host = await startWebHost({ api: hosted.api, subscribe: hosted.subscribe, files: FILES, host: '127.0.0.1', port: 0, log: () => {} });
    base = host.url;
  });
  afterAll(async () => {
    await host?.close();
    await hosted?.close();
    rmSync(dir, { recursive: true, force: true });
  });

  it('needs no token on loopback', () => {
    expect(host.token).toBeUndefined();
    expect(host.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/$/);
  });

  it('answers each malformed call with a clear 4xx and leaves the database untouched', async () => {
    const before = databaseDigest();
    expect(before).not.toBe('');
    const cases: Array<[Promise<Reply>, number, RegExp]> = [
      [call(base, 'dropEverything', []), 400, /"dropEverything" is not a Rolloff API method/],
      [call(base, '%E0%A4%A', []), 400, /is not a valid method path/],
      [call(base, '__proto__', []), 400, /"__proto__" is not a Rolloff API method/],
      [call(base, 'saveDesign', '{"name": '), 400, /saveDesign request body: is not valid JSON/],
      [call(base, 'getRun', { runId: 1 }), 400, /getRun arguments: must be a JSON array/],
      [call(base, 'getRun', ['1']), 400, /getRun\(runId\): must be a finite number/],
      [call(base, 'saveDesign', ['not a design']), 400, /saveDesign\(design\): must be an object/],
      [call(base, 'saveDesign', [{ ...GOOD_DESIGN, parts: [{ ...GOOD_DESIGN.parts[0], value: '-1k' }, ...GOOD_DESIGN.parts.slice(1)] }]), 400, /RN/],
      [call(base, 'createBuild', [{ designId: 1, label: 'A', notes: '', actualValues: { RF: 0 } }]), 400, /createBuild\(build\)\.actualValues\.RF: must be greater than zero/],
      [call(base, 'startRun', [{ buildId: 1, kind: 'ac', from: 1000, to: 10 }]), 400, /startRun\(request\)\.to: must be above the start frequency/],
      [call(base, 'exportRecord', [[1], 'docx']), 400, /exportRecord\(format \[argument 2\]\): must be one of pdf, html, csv, json/],
      [send(new URL('api/listDesigns', base).href, { method: 'POST', headers: { 'Content-Type': 'text/plain' }, body: '[]' }), 415, /Content-Type: must be application\/json/],
      [send(new URL('api/listDesigns', base).href), 405, /GET is not allowed/],
      [call(base, 'saveDesign', JSON.stringify([{ ...GOOD_DESIGN, name: 'x'.repeat(3 * 1024 * 1024) }])), 413, /at most 2097152 are accepted/],
      [call(base, 'listDesigns', [], { Origin: 'http://attacker.invalid' }), 403, /Requests from http:\/\/attacker\.invalid are refused/],
      [call(base, 'listDesigns', [], { Host: 'rebound.invalid' }), 403, /loopback-only host/],
    ];
    for (const [pending, status, message] of cases) {
      const reply = await pending;
      expect(reply.status, `${status} ${message}`).toBe(status);
      expect(errorOf(reply).message, String(message)).toMatch(message);
    }
    expect((JSON.parse((await call(base, 'listDesigns', [])).body) as { result: unknown[] }).result).toEqual([]);
    expect(databaseDigest()).toBe(before);

    // The digest does notice a write: a well-formed call stores the design and changes the files.
    const saved = await call(base, 'saveDesign', [GOOD_DESIGN]);
    expect(saved.status).toBe(200);
    expect(JSON.parse(saved.body).result).toMatchObject({ id: 1, name: GOOD_DESIGN.name });
    expect(databaseDigest()).not.toBe(before);
  });

  it('reports a refusal by the service (not a validation error) as 422 with its hint', async () => {
    const reply = await call(base, 'startSimulatedBench', [999]);
    expect(reply.status).toBe(422);
    expect(errorOf(reply).message).toMatch(/999/);
  });
});

describe('which addresses count as loopback', () => {
  it('127.0.0.0/8, ::1 (bracketed or not), IPv4-mapped 127/8 and localhost do; anything else does not', () => {
    for (const host of ['127.0.0.1', '127.0.0.2', '127.255.255.255', '127.1.2.3', '::1', '[::1]', '::ffff:127.0.0.1', 'localhost', 'LOCALHOST']) {
      expect(isLoopbackHost(host), host).toBe(true);
    }
    for (const host of ['0.0.0.0', '::', '[::]', '192.0.2.2', '10.0.0.1', '128.0.0.1', '126.255.255.255', '127.0.0.256', '127.0.0', '::2', 'fd00::2', '::ffff:192.0.2.2', 'localhost.example', 'evil-localhost', '127.0.0.1.example', '']) {
      expect(isLoopbackHost(host), host).toBe(false);
    }
  });
});

/** This machine's first IPv4 address that is not loopback, if it has one. */
const OWN_ADDRESS = Object.values(networkInterfaces())
  .flat()
  .find((entry) => entry !== undefined && entry.family === 'IPv4' && !entry.internal)?.address;
if (!OWN_ADDRESS) console.warn('SKIPPED: this machine has no non-loopback IPv4 address; the token default is shown on the wildcard address only.');

describe('web host default, no token mode given: a token off loopback, none on it', () => {
  let dir: string;
  let hosted: HostedService;

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'rolloff-host-'));
    hosted = await openHostedService(join(dir, 'bench.sqlite'));
  });
  afterAll(async () => {
    await hosted?.close();
    rmSync(dir, { recursive: true, force: true });
  });

  const startOn = (host: string) => startWebHost({ api: hosted.api, subscribe: hosted.subscribe, files: FILES, host, port: 0, log: () => {} });

  /** Bound to `bindAddress`, reached at `reachAddress`: refused without the token, served with it. */
  async function expectTokenRequired(bindAddress: string, reachAddress: string): Promise<void> {
    const host = await startOn(bindAddress);
    try {
      expect(host.token).toMatch(/^[A-Za-z0-9_-]{43}$/);
      const base = `http://${reachAddress}:${host.port}/`;
      expect((await send(base)).status).toBe(401);
      expect((await call(base, 'listDesigns', [])).status).toBe(401);
      expect((await call(base, 'listDesigns', [], { Authorization: 'Bearer wrong' })).status).toBe(403);
      expect((await send(`${base}?token=${host.token}`)).status).toBe(200);
      const designs = await call(base, 'listDesigns', [], { Authorization: `Bearer ${host.token}` });
      expect(designs.status).toBe(200);
      expect(JSON.parse(designs.body)).toEqual({ result: [] });
      expect(await websocketOutcome(`ws://${reachAddress}:${host.port}/events`)).toEqual({ opened: false, status: 401 });
    } finally {
      await host.close();
    }
  }

  it('bound to the wildcard address 0.0.0.0: every page, call and event socket needs the token', async () => {
    await expectTokenRequired('0.0.0.0', '127.0.0.1');
  });

  it.skipIf(!OWN_ADDRESS)(`bound to this machine's own address ${OWN_ADDRESS ?? ''}: every page, call and event socket needs the token`, async () => {
    await expectTokenRequired(OWN_ADDRESS!, OWN_ADDRESS!);
  });

  it.each(['127.0.0.1', '127.0.0.2', 'localhost'])('bound to loopback %s: serves without a token, and refuses a foreign Host header', async (bindAddress) => {
    const host = await startOn(bindAddress);
    try {
      expect(host.token).toBeUndefined();
      expect(host.url).not.toMatch(/token/);
      expect(isLoopbackHost(host.host)).toBe(true);
      expect((await send(host.url)).status).toBe(200);
      const designs = await call(host.url, 'listDesigns', []);
      expect(designs.status).toBe(200);
      expect(JSON.parse(designs.body)).toEqual({ result: [] });
      const outcome = await websocketOutcome(new URL('events', host.url.replace(/^http/, 'ws')).href);
      expect(outcome.opened).toBe(true);
      if (outcome.opened) outcome.socket.close();
      expect((await call(host.url, 'listDesigns', [], { Host: 'rebound.invalid' })).status).toBe(403);
    } finally {
      await host.close();
    }
  });
});
