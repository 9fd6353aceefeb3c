/**
 * Electron main process: one secure window, the service in this process
 * (serial ports and the store never enter the page), the contract over
 * validated IPC. Built by main/build.ts into out/electron/main.mjs.
 */
import { app, BrowserWindow, ipcMain, shell } from 'electron';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { openHostedService } from '../app/host/hosted-service';
import { resolveDatabasePath } from '../app/store';
import { registerIpc } from './ipc';
import { createMainWindow } from './window';

// This file runs from out/electron/main.mjs; the preload and renderer sit beside it.
const here = fileURLToPath(new URL('.', import.meta.url));
const rendererIndex = join(here, 'renderer', 'index.html');
const rendererUrl = pathToFileURL(rendererIndex).href;

/** `--db PATH` after the entry, as for the CLI; else ROLLOFF_DB or the per-user data folder. */
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
  const hosted = await openHostedService(resolveDatabasePath(databaseFromArgs(process.argv)));
  const wiring = registerIpc({
    ipcMain,
    api: hosted.api,
    windows: () => BrowserWindow.getAllWindows().map((w) => w.webContents),
    isTrustedSender: (url) => url === rendererUrl || url.startsWith(rendererUrl + '#'),
  });
  const unsubscribe = hosted.subscribe((event, payload) => wiring.forward(event, payload));
  await createMainWindow(BrowserWindow, { preload: join(here, 'preload.cjs'), indexHtml: rendererIndex }, (url) => void shell.openExternal(url));

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
