/**
 * The one application window, secure by default: isolated context, no Node in
 * the page, sandboxed renderer, strict CSP, no navigation away from the app,
 * no new windows, no webviews, no permission grants.
 */
import type { BrowserWindowConstructorOptions } from 'electron';
import { contentSecurityPolicy } from '../app/host/content-security-policy';
import { RENDERER_INDEX_URL } from './renderer-scheme';

/** The parts of BrowserWindow used here (injected so tests can pass a fake). */
export interface WindowLike {
  loadURL(url: string): Promise<void>;
  once(event: 'ready-to-show', listener: () => void): unknown;
  show(): void;
  webContents: WebContentsSecurityLike;
}

export interface WebContentsSecurityLike {
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- Electron's own event-emitter signature
  on(event: string, listener: (...args: any[]) => void): unknown;
  setWindowOpenHandler(handler: (details: { url: string }) => { action: 'deny' }): void;
  session: {
    setPermissionRequestHandler(handler: (webContents: unknown, permission: string, callback: (granted: boolean) => void) => void): void;
    webRequest: {
      onHeadersReceived(listener: (details: { responseHeaders?: Record<string, string[]> }, callback: (response: { responseHeaders: Record<string, string[]> }) => void) => void): void;
    };
  };
}

export type WindowConstructor = new (options: BrowserWindowConstructorOptions) => WindowLike;

/** The webPreferences every Rolloff window gets. */
function secureWindowOptions(preloadPath: string): BrowserWindowConstructorOptions {
  return {
    width: 1280,
    height: 800,
    minWidth: 1024,
    minHeight: 700,
    show: false,
    title: 'Rolloff',
    backgroundColor: '#f6f5f0',
    webPreferences: {
      preload: preloadPath,
      contextIsolation: true,
      nodeIntegration: false,
      nodeIntegrationInWorker: false,
      nodeIntegrationInSubFrames: false,
      sandbox: true,
      webSecurity: true,
      allowRunningInsecureContent: false,
      webviewTag: false,
      navigateOnDragDrop: false,
      spellcheck: false,
    },
  };
}

/** The page comes from the window's own scheme (renderer-scheme.ts), never from a file:// path. */
export async function createMainWindow(Window: WindowConstructor, paths: { preload: string }, openExternal?: (url: string) => void): Promise<WindowLike> {
  const window = new Window(secureWindowOptions(paths.preload));
  hardenWebContents(window.webContents, openExternal);
  window.once('ready-to-show', () => window.show());
  await window.loadURL(RENDERER_INDEX_URL);
  return window;
}

function hardenWebContents(contents: WebContentsSecurityLike, openExternal?: (url: string) => void): void {
  const block = (event: { preventDefault(): void }) => event.preventDefault();
  contents.on('will-navigate', block);
  contents.on('will-redirect', block);
  contents.on('will-attach-webview', block);
  contents.setWindowOpenHandler(({ url }) => {
    // Links to documentation may open in the user's browser, never inside the app.
    if (openExternal && /^https:\/\//.test(url)) openExternal(url);
    return { action: 'deny' };
  });
  contents.session.setPermissionRequestHandler((_contents, _permission, callback) => callback(false));
  contents.session.webRequest.onHeadersReceived((details, callback) => {
    callback({ responseHeaders: { ...(details.responseHeaders ?? {}), 'Content-Security-Policy': [contentSecurityPolicy()] } });
  });
}
