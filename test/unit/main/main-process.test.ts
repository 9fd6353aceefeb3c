/**
 * The built main process (main/main.ts as esbuild bundles it for the desktop
 * shell), run in Node with a recording stand-in for the "electron" package
 * (helpers/electron-stand-in.ts) because the Electron binary cannot be
 * installed here. It checks the wiring the real shell relies on: the window
 * scheme is privileged before the app is ready, served from the bundle folder
 * after, the window loads it, and only that page may call the service. The
 * real shell is driven by test/e2e/electron.test.ts where the binary exists.
 * Expected order: Electron's protocol docs (registerSchemesAsPrivileged "can
 * only be used before the ready event"); the rest — common practice, no source.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { CALL_CHANNEL } from '../../../main/channels';
import { buildShellInTempFolder, type ShellFolder } from '../../helpers/electron-shell-folder';
import { electronJournal } from './helpers/electron-stand-in';

let shell: ShellFolder | undefined;
afterAll(() => shell?.remove());

async function until(condition: () => boolean, what: string): Promise<void> {
  for (let i = 0; i < 400 && !condition(); i++) await new Promise((r) => setTimeout(r, 25));
  if (!condition()) throw new Error(`timed out waiting for ${what}; calls: ${electronJournal().calls.join(', ')}`);
}

describe('the main process, bundled, on a stand-in for Electron', () => {
  it('registers the window scheme before ready, serves the bundle on it, loads it, and trusts only that page', async () => {
    shell = await buildShellInTempFolder({ mainAlias: { electron: join(__dirname, 'helpers', 'electron-stand-in.ts') } });
    const { outDir } = shell;
    const journal = electronJournal();
    const argv = process.argv;
    // main.ts reads --db once the app is ready, so the argument stays until the window has loaded
    // (restored earlier, the shell would open the user's own database in the per-user data folder).
    const database = join(shell.root, 'bench.sqlite');
    process.argv = [...argv, '--db', database];
    journal.userDataPath = join(shell.root, 'user-data');
    try {
      await import(pathToFileURL(join(outDir, 'main.mjs')).href);
      expect(journal.calls).toEqual(['protocol.registerSchemesAsPrivileged', 'app.whenReady']);
      expect(journal.privilegedSchemes).toEqual([{ scheme: 'rolloff', privileges: { standard: true, secure: true } }]);

      journal.becomeReady();
      await until(() => journal.loadedUrls.length > 0 || journal.exitCode !== undefined, 'the window to load');
    } finally {
      process.argv = argv;
    }
    expect(journal.exitCode).toBeUndefined();
    expect(existsSync(database)).toBe(true);
    expect(journal.calls.indexOf('protocol.handle(rolloff)')).toBeGreaterThan(journal.calls.indexOf('app.whenReady'));
    expect(journal.calls.indexOf('protocol.handle(rolloff)')).toBeLessThan(journal.calls.indexOf('window.loadURL'));
    expect(journal.loadedUrls).toEqual(['rolloff://app/index.html']);

    // The handler main.ts registered serves the built renderer, and nothing beside it.
    const serve = journal.protocolHandlers.get('rolloff')!;
    const page = await serve(new Request('rolloff://app/index.html'));
    expect(page.status).toBe(200);
    expect(await page.text()).toBe(readFileSync(join(outDir, 'renderer', 'index.html'), 'utf8'));
    const script = await serve(new Request('rolloff://app/app.js'));
    expect(script.headers.get('content-type')).toBe('text/javascript; charset=utf-8');
    expect((await script.arrayBuffer()).byteLength).toBe(readFileSync(join(outDir, 'renderer', 'app.js')).length);
    expect((await serve(new Request('rolloff://app/../main.mjs'))).status).toBe(404);
    expect((await serve(new Request('rolloff://app/..%2fpreload.cjs'))).status).toBe(403);

    // Calls from the page reach the service; from a file:// page (where the renderer used to live) they are refused.
    const call = journal.ipcHandlers.get(CALL_CHANNEL)!;
    const fromPage = (await call({ senderFrame: { url: 'rolloff://app/index.html' } }, 'listTemplates', [])) as { ok: boolean; result?: unknown[] };
    expect(fromPage.ok).toBe(true);
    expect(fromPage.result!.length).toBeGreaterThan(3);
    const fromFile = (await call({ senderFrame: { url: pathToFileURL(join(outDir, 'renderer', 'index.html')).href } }, 'listTemplates', [])) as { ok: boolean; error?: { message: string } };
    // The store choice is saved in Electron's per-user folder; --db given at start is said to win at the next start too.
    const store = (await call({ senderFrame: { url: 'rolloff://app/index.html' } }, 'storeInUse', [])) as { ok: boolean; result?: Record<string, unknown> };
    expect(store.result).toMatchObject({ location: database, kind: 'sqlite file', source: 'command line', choiceKept: 'saved', settingsFile: join(shell.root, 'user-data', 'settings.json') });
    expect(store.result!.notes).toEqual([expect.stringMatching(/--db wins at the next start/)]);
    expect(fromFile).toMatchObject({ ok: false, error: { message: expect.stringMatching(/are refused/) } });

    // Quitting pauses nothing here (no run), closes the store, then quits.
    let prevented = false;
    journal.app.emit('before-quit', { preventDefault: () => (prevented = true) });
    expect(prevented).toBe(true);
    await until(() => journal.calls.includes('app.quit'), 'the app to quit after closing the store');
  });
});
