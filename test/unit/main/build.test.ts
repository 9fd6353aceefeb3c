/**
 * The desktop build (what `npm start` launches) bundles without the Electron
 * binary: main process, CommonJS entry, sandbox-compatible preload and the
 * renderer. Expectations: Electron's sandboxed preloads may require only a
 * few built-ins such as "electron" (electronjs.org/docs/latest/tutorial/sandbox).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { buildElectronShell } from '../../../main/build';

const outDir = join(mkdtempSync(join(tmpdir(), 'rolloff-electron-')), 'electron');
afterAll(() => rmSync(join(outDir, '..'), { recursive: true, force: true }));

describe('electron build', () => {
  it('writes main, entry, preload and renderer', async () => {
    const { mainEntry } = await buildElectronShell(outDir);
    expect(mainEntry).toBe(join(outDir, 'main.cjs'));
    for (const file of ['main.mjs', 'main.cjs', 'preload.cjs', 'renderer/index.html', 'renderer/app.js', 'renderer/app.css']) {
      expect(existsSync(join(outDir, file)), file).toBe(true);
    }
    const preload = readFileSync(join(outDir, 'preload.cjs'), 'utf8');
    const required = [...preload.matchAll(/require\(["']([^"']+)["']\)/g)].map((m) => m[1]);
    expect(new Set(required)).toEqual(new Set(['electron']));
    expect(preload).toContain('exposeInMainWorld');

    const main = readFileSync(join(outDir, 'main.mjs'), 'utf8');
    expect(main).toMatch(/from "electron"/);
    expect(main).toMatch(/contextIsolation: true/);
    expect(main).toMatch(/sandbox: true/);
    expect(main).not.toMatch(/nodeIntegration: true/);
    // Native modules stay external so they load from node_modules (rebuilt for Electron by install-app-deps).
    expect(main).toMatch(/from "better-sqlite3"/);

    const html = readFileSync(join(outDir, 'renderer/index.html'), 'utf8');
    expect(html).toMatch(/Content-Security-Policy" content="default-src 'self'/);
  });

  it('bundles the preload without the validation library: it passes on event names only (app/contract/events.ts imports no valibot)', async () => {
    const folder = join(mkdtempSync(join(tmpdir(), 'rolloff-preload-')), 'electron');
    try {
      await buildElectronShell(folder);
      const preload = readFileSync(join(folder, 'preload.cjs'), 'utf8');
      // esbuild names each bundled module in a comment ("// node_modules/valibot/dist/index.mjs").
      expect(preload).toMatch(/\/\/ app\/contract\/events\.ts/);
      expect(preload).not.toMatch(/valibot/);
      expect(preload).toContain('"progress", "point", "runEvent", "traffic", "bench"');
      const renderer = readFileSync(join(folder, 'renderer/app.js'), 'utf8');
      // The window does check replies: its bundle carries the reply schemas' wording (app/contract/reply-fields.ts).
      expect(renderer.includes('null where it has none'), 'the reply checks are missing from the renderer bundle').toBe(true);
    } finally {
      rmSync(join(folder, '..'), { recursive: true, force: true });
    }
  });
});
