/**
 * The window's own scheme without Electron: which request gets which bundle
 * file, and the handler serving a real folder on disk with Node's own
 * Request/Response (the same Fetch API classes Electron's protocol.handle
 * passes and expects). Expected behaviour: Electron's security checklist
 * ("avoid the file protocol", electronjs.org/docs/latest/tutorial/security),
 * RFC 9110 §15.5 for the status codes, RFC 3986 §5.2.4 for dot segments —
 * the cases below are worked by hand.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdirSync, mkdtempSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { isRendererPageUrl, RENDERER_INDEX_URL, RENDERER_SCHEME_PRIVILEGES, resolveBundleRequest } from '../../../main/renderer-scheme';
import { bundleRequestHandler, registerRendererScheme, serveRendererBundle } from '../../../main/renderer-protocol';
import { contentTypeOf } from '../../../app/host/content-type';

const FILES = new Set(['index.html', 'app.js', 'app.css', 'fonts/body.woff2']);
const get = (url: string, method = 'GET') => resolveBundleRequest({ url, method }, FILES);

describe('resolveBundleRequest', () => {
  it('serves the bundle files with their content types, the bare origin as the page', () => {
    expect(get('rolloff://app/index.html')).toEqual({ ok: true, fileName: 'index.html', contentType: 'text/html; charset=utf-8' });
    expect(get('rolloff://app/')).toMatchObject({ ok: true, fileName: 'index.html' });
    expect(get('rolloff://app')).toMatchObject({ ok: true, fileName: 'index.html' });
    expect(get('rolloff://app/app.js')).toMatchObject({ ok: true, contentType: 'text/javascript; charset=utf-8' });
    expect(get('rolloff://app/app.css')).toMatchObject({ ok: true, contentType: 'text/css; charset=utf-8' });
    expect(get('rolloff://app/fonts/body.woff2')).toMatchObject({ ok: true, fileName: 'fonts/body.woff2', contentType: 'font/woff2' });
    // Query and fragment do not name another file.
    expect(get('rolloff://app/index.html?view=compare#x')).toMatchObject({ ok: true, fileName: 'index.html' });
    expect(get('rolloff://app/app.js', 'HEAD')).toMatchObject({ ok: true });
  });

  it('refuses every spelling of a path out of the folder (403), before any lookup', () => {
    for (const url of [
      'rolloff://app/..%2fmain.mjs',
      'rolloff://app/..%2F..%2Fetc%2Fpasswd',
      'rolloff://app/fonts/..%5c..%5cmain.mjs',
      'rolloff://app/%2e%2e%5cmain.mjs',
      'rolloff://app//etc/passwd',
      'rolloff://app/fonts//body.woff2',
      'rolloff://app/index.html%00.js',
      'rolloff://app/C:%5cWindows%5cwin.ini',
    ]) {
      expect(get(url), url).toMatchObject({ ok: false, status: 403 });
    }
  });

  it('treats plain dot segments as the URL parser does (RFC 3986 §5.2.4): removed, so they stay inside and miss (404)', () => {
    // rolloff://app/../main.mjs is rolloff://app/main.mjs: main.mjs sits beside the bundle folder, not in it.
    expect(get('rolloff://app/../main.mjs')).toMatchObject({ ok: false, status: 404 });
    expect(get('rolloff://app/%2e%2e/%2e%2e/preload.cjs')).toMatchObject({ ok: false, status: 404 });
    expect(get('rolloff://app/fonts/../app.js')).toMatchObject({ ok: true, fileName: 'app.js' });
  });

  it('answers 404 for unknown paths and other origins, 405 for writes, 400 for broken encoding', () => {
    expect(get('rolloff://app/nothing.js')).toMatchObject({ ok: false, status: 404, reason: expect.stringMatching(/not a file of the window/) });
    expect(get('rolloff://app/fonts')).toMatchObject({ ok: false, status: 404 });
    expect(get('rolloff://other/index.html')).toMatchObject({ ok: false, status: 404, reason: expect.stringMatching(/not the window's origin/) });
    expect(get('rolloff:///index.html')).toMatchObject({ ok: false, status: 404 });
    expect(get('https://app/index.html')).toMatchObject({ ok: false, status: 404 });
    expect(get('rolloff://app/index.html', 'POST')).toMatchObject({ ok: false, status: 405 });
    expect(get('rolloff://app/%E0%A4%A.js')).toMatchObject({ ok: false, status: 400 });
    expect(get('not a url')).toMatchObject({ ok: false, status: 400 });
  });
});

describe('content types', () => {
  it('are taken from the extension, case-insensitively, bytes otherwise', () => {
    expect(contentTypeOf('index.HTML')).toBe('text/html; charset=utf-8');
    expect(contentTypeOf('logo.svg')).toBe('image/svg+xml');
    expect(contentTypeOf('data.json')).toBe('application/json');
    expect(contentTypeOf('archive.tar')).toBe('application/octet-stream');
    expect(contentTypeOf('fonts.d/README')).toBe('application/octet-stream');
  });
});

describe('the trusted sender', () => {
  it('is the page on the window scheme, with or without a fragment, nothing else', () => {
    expect(isRendererPageUrl(RENDERER_INDEX_URL)).toBe(true);
    expect(isRendererPageUrl('rolloff://app/index.html#/compare')).toBe(true);
    for (const url of ['file:///opt/rolloff/renderer/index.html', 'rolloff://app/index.html.evil', 'rolloff://app.evil/index.html', 'rolloff://app/other.html', 'https://app/index.html', '']) {
      expect(isRendererPageUrl(url), url).toBe(false);
    }
  });
});

describe('the protocol handler on a real folder', () => {
  const dir = mkdtempSync(join(tmpdir(), 'rolloff-scheme-'));
  const bundle = join(dir, 'renderer');
  let handler: (request: Request) => Promise<Response>;

  beforeAll(async () => {
    mkdirSync(join(bundle, 'fonts'), { recursive: true });
    writeFileSync(join(bundle, 'index.html'), '<!doctype html><title>t</title>');
    writeFileSync(join(bundle, 'app.js'), 'export const x = 1;\n');
    writeFileSync(join(bundle, 'fonts', 'body.woff2'), Buffer.from([0x77, 0x4f, 0x46, 0x32]));
    writeFileSync(join(dir, 'main.mjs'), 'secret main process');
    // A link inside the folder pointing out of it is not a file of the bundle.
    symlinkSync(join(dir, 'main.mjs'), join(bundle, 'linked.js'));
    handler = await bundleRequestHandler(bundle);
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('sends the file with its type, the CSP and nosniff', async () => {
    const response = await handler(new Request('rolloff://app/app.js'));
    expect(response.status).toBe(200);
    expect(await response.text()).toBe('export const x = 1;\n');
    expect(response.headers.get('content-type')).toBe('text/javascript; charset=utf-8');
    expect(response.headers.get('content-security-policy')).toMatch(/^default-src 'self'/);
    expect(response.headers.get('x-content-type-options')).toBe('nosniff');
    const font = await handler(new Request('rolloff://app/fonts/body.woff2'));
    expect(Buffer.from(await font.arrayBuffer())).toEqual(Buffer.from([0x77, 0x4f, 0x46, 0x32]));
    const page = await handler(new Request('rolloff://app/'));
    expect(await page.text()).toBe('<!doctype html><title>t</title>');
    const head = await handler(new Request('rolloff://app/index.html', { method: 'HEAD' }));
    expect(head.status).toBe(200);
    expect(head.headers.get('content-length')).toBe('31');
    expect(await head.text()).toBe('');
  });

  it('never sends what lies beside or outside the folder', async () => {
    for (const [url, status] of [
      ['rolloff://app/../main.mjs', 404],
      ['rolloff://app/..%2fmain.mjs', 403],
      ['rolloff://app/linked.js', 404],
      ['rolloff://app/missing.css', 404],
    ] as const) {
      const response = await handler(new Request(url));
      expect(response.status, url).toBe(status);
      expect(await response.text(), url).not.toMatch(/secret/);
    }
    expect((await handler(new Request('rolloff://app/index.html', { method: 'POST', body: 'x' }))).status).toBe(405);
  });

  it('is registered as privileged (standard, secure, nothing looser) and handled on the rolloff scheme', async () => {
    const calls: Array<[string, unknown]> = [];
    registerRendererScheme({ registerSchemesAsPrivileged: (schemes) => calls.push(['privileged', schemes]) });
    await serveRendererBundle({ handle: (scheme, h) => calls.push(['handle', [scheme, typeof h]]) }, bundle);
    expect(calls).toEqual([
      ['privileged', [{ scheme: 'rolloff', privileges: { standard: true, secure: true } }]],
      ['handle', ['rolloff', 'function']],
    ]);
    expect(RENDERER_SCHEME_PRIVILEGES).not.toHaveProperty('bypassCSP');
  });
});
