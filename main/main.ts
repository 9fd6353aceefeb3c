/**
 * Electron main process: one secure window, the service in this process
 * (serial ports and the store never enter the page), the contract over
 * validated IPC, the page served on its own scheme (renderer-scheme.ts).
 * Built by main/build.ts into out/electron/main.mjs.
 */
import { app, BrowserWindow, ipcMain, protocol, shell } from 'electron';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { openDesktopService } from '../app/host/desktop-store';
import { SETTINGS_FILE_NAME } from '../app/host/user-settings-file';
import { registerIpc } from './ipc';
import { registerRendererScheme, serveRendererBundle } from './renderer-protocol';
import { isRendererPageUrl } from './renderer-scheme';
import { createMainWindow } from './window';

// This file runs from out/electron/main.mjs; the preload and renderer sit beside it.
const here = fileURLToPath(new URL('.', import.meta.url));
const rendererDir = join(here, 'renderer');

// Privileged schemes can only be registered before the ready event.
registerRendererScheme(protocol);

/** `--db PATH` after the entry, as for the CLI; else ROLLOFF_DB, the store saved in the window's settings, or the per-user data folder. */
function databaseFromArgs(argv: string[]): string | undefined {
  const at = argv.indexOf('--db');
  return at >= 0 ? argv[at + 1] : argv.find((a) => a.startsWith('--db='))?.slice('--db='.length);
}

async function start(): Promise<void> {
  // Nothing in the page may reach the network; deny at the app level as well.
  app.on('web-contents-created', (_event, contents) => {
    contents.on('will-navigate', (event) => event.preventDefault());
    contents.setWindowOpenHandler(() => ({ action: 'deny' }));
  });
  await app.whenReady();
  await serveRendererBundle(protocol, rendererDir);
  // The desktop window starts on this machine's real instruments: their saved maximum stimulus applies (the simulated bench has its own).
  // The store chosen in the window is saved beside Electron's own per-user data.
  const settingsFile = join(app.getPath('userData'), SETTINGS_FILE_NAME);
  const hosted = await openDesktopService(databaseFromArgs(process.argv), settingsFile, { startOn: 'real instruments', ownerLabel: 'the desktop window' });
  for (const note of (await hosted.api.storeInUse()).notes) process.stderr.write(`Rolloff: ${note}\n`);
  const wiring = registerIpc({
    ipcMain,
    api: hosted.api,
    windows: () => BrowserWindow.getAllWindows().map((w) => w.webContents),
    isTrustedSender: isRendererPageUrl,
  });
  const unsubscribe = hosted.subscribe((event, payload) => wiring.forward(event, payload));
  await createMainWindow(BrowserWindow, { preload: join(here, 'preload.cjs') }, (url) => void shell.openExternal(url));

  let closing = false;
  app.on('window-all-closed', () => app.quit());
  app.on('before-quit', (event) => {
    if (closing) return;
    // Pause running sweeps (resumable) and close the store before the process ends.
    event.preventDefault();
    closing = true;
    unsubscribe();
    wiring.dispose();
    hosted.close().finally(() => app.quit());
  });
}

start().catch((error) => {
  process.stderr.write(`Rolloff could not start: ${(error as Error)?.stack ?? String(error)}\n`);
  app.exit(1);
});
