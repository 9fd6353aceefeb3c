/**
 * The window's security settings, checked on a fake BrowserWindow (the
 * Electron binary is not available here). Expected settings: Electron's
 * security checklist (electronjs.org/docs/latest/tutorial/security) —
 * context isolation, no Node integration, sandbox, CSP, no navigation, no new
 * windows, no webviews, deny permissions.
 */
import { describe, expect, it } from 'vitest';
import type { BrowserWindowConstructorOptions } from 'electron';
import { createMainWindow, type WebContentsSecurityLike, type WindowLike } from '../../../main/window';

type Listener = (...args: unknown[]) => unknown;

class FakeWebContents implements WebContentsSecurityLike {
  readonly listeners = new Map<string, Listener>();
  openHandler: ((details: { url: string }) => { action: 'deny' }) | undefined;
  permissionHandler: ((webContents: unknown, permission: string, callback: (granted: boolean) => void) => void) | undefined;
  headersListener: Listener | undefined;
  on(event: string, listener: Listener): this {
    this.listeners.set(event, listener);
    return this;
  }
  setWindowOpenHandler(handler: (details: { url: string }) => { action: 'deny' }): void {
    this.openHandler = handler;
  }
  session: WebContentsSecurityLike['session'] = {
    setPermissionRequestHandler: (handler) => {
      this.permissionHandler = handler;
    },
    webRequest: {
      onHeadersReceived: (listener) => {
        this.headersListener = listener as Listener;
      },
    },
  };
}

class FakeWindow implements WindowLike {
  static last: FakeWindow | undefined;
  readonly webContents = new FakeWebContents();
  loaded: string | undefined;
  constructor(readonly options: BrowserWindowConstructorOptions) {
    FakeWindow.last = this;
  }
  async loadURL(url: string): Promise<void> {
    this.loaded = url;
  }
  once(): this {
    return this;
  }
  show(): void {}
}

describe('main window', () => {
  it('is created with isolation, sandbox and no Node in the page', async () => {
    await createMainWindow(FakeWindow, { preload: '/app/preload.cjs' });
    const window = FakeWindow.last!;
    // The page's own origin, not file:// (renderer-scheme.ts).
    expect(window.loaded).toBe('rolloff://app/index.html');
    expect(window.options.width).toBe(1280);
    expect(window.options.height).toBe(800);
    expect(window.options.webPreferences).toMatchObject({
      preload: '/app/preload.cjs',
      contextIsolation: true,
      nodeIntegration: false,
      sandbox: true,
      webSecurity: true,
      allowRunningInsecureContent: false,
      webviewTag: false,
    });
  });

  it('blocks navigation, redirects, webviews, new windows and permission requests', async () => {
    const opened: string[] = [];
    await createMainWindow(FakeWindow, { preload: 'p' }, (url) => opened.push(url));
    const contents = FakeWindow.last!.webContents;
    for (const event of ['will-navigate', 'will-redirect', 'will-attach-webview']) {
      let prevented = false;
      contents.listeners.get(event)!({ preventDefault: () => (prevented = true) }, 'https://example.invalid/');
      expect(prevented, event).toBe(true);
    }
    expect(contents.openHandler!({ url: 'https://example.invalid/manual' })).toEqual({ action: 'deny' });
    expect(contents.openHandler!({ url: 'file:///etc/passwd' })).toEqual({ action: 'deny' });
    expect(opened).toEqual(['https://example.invalid/manual']);
    let granted: boolean | undefined;
    contents.permissionHandler!(null, 'media', (value) => (granted = value));
    expect(granted).toBe(false);
  });

  it('adds a strict Content-Security-Policy to every response', async () => {
    await createMainWindow(FakeWindow, { preload: 'p' });
    let headers: Record<string, string[]> = {};
    FakeWindow.last!.webContents.headersListener!({ responseHeaders: { 'X-Other': ['1'] } }, (response: { responseHeaders: Record<string, string[]> }) => (headers = response.responseHeaders));
    const policy = headers['Content-Security-Policy'][0];
    expect(policy).toContain("default-src 'self'");
    expect(policy).toContain("script-src 'self'");
    expect(policy).toContain("object-src 'none'");
    expect(policy).not.toMatch(/unsafe-inline|unsafe-eval|https?:/);
    expect(headers['X-Other']).toEqual(['1']);
  });
});
