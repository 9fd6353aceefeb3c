/**
 * A stand-in for the "electron" package, bundled into main.mjs in its place by
 * main-process.test.ts (the Electron binary cannot be installed here). It has
 * only what main/main.ts uses, and records every call in a journal on
 * globalThis, which the test reads (the bundle holds its own copy of this
 * module, so module state would not be shared).
 */
import { EventEmitter } from 'node:events';

export interface ElectronJournal {
  /** Calls in the order main.ts made them. */
  calls: string[];
  privilegedSchemes: Array<{ scheme: string; privileges: Record<string, boolean> }>;
  protocolHandlers: Map<string, (request: Request) => Response | Promise<Response>>;
  ipcHandlers: Map<string, (event: { senderFrame: { url: string } | null }, ...args: unknown[]) => unknown>;
  windows: StandInWindow[];
  loadedUrls: string[];
  exitCode: number | undefined;
  /** What app.getPath('userData') answers (the test sets a temporary folder). */
  userDataPath: string;
  /** One app object for every copy of this module, so the test can emit its events. */
  app: EventEmitter;
  /** Lets the test decide when the app becomes ready. */
  becomeReady(): void;
  ready: Promise<void>;
}

const JOURNAL_KEY = '__rolloffElectronJournal';

export function electronJournal(): ElectronJournal {
  const holder = globalThis as unknown as Record<string, ElectronJournal | undefined>;
  if (!holder[JOURNAL_KEY]) {
    let becomeReady = () => {};
    const ready = new Promise<void>((resolve) => (becomeReady = resolve));
    holder[JOURNAL_KEY] = { calls: [], privilegedSchemes: [], protocolHandlers: new Map(), ipcHandlers: new Map(), windows: [], loadedUrls: [], exitCode: undefined, userDataPath: '', app: new StandInApp(), becomeReady, ready };
  }
  return holder[JOURNAL_KEY]!;
}

class StandInApp extends EventEmitter {
  whenReady(): Promise<void> {
    journal.calls.push('app.whenReady');
    return journal.ready;
  }
  getPath(name: string): string {
    journal.calls.push(`app.getPath(${name})`);
    if (name !== 'userData' || !journal.userDataPath) throw new Error(`the stand-in knows only app.getPath('userData'), once the test sets it; asked for ${name}`);
    return journal.userDataPath;
  }
  quit(): void {
    journal.calls.push('app.quit');
  }
  exit(code: number): void {
    journal.calls.push(`app.exit(${code})`);
    journal.exitCode = code;
  }
}

const journal = electronJournal();
export const app = journal.app;

export const protocol = {
  registerSchemesAsPrivileged(schemes: ElectronJournal['privilegedSchemes']): void {
    journal.calls.push('protocol.registerSchemesAsPrivileged');
    journal.privilegedSchemes.push(...schemes);
  },
  handle(scheme: string, handler: (request: Request) => Response | Promise<Response>): void {
    journal.calls.push(`protocol.handle(${scheme})`);
    journal.protocolHandlers.set(scheme, handler);
  },
};

export const ipcMain = {
  handle(channel: string, listener: ElectronJournal['ipcHandlers'] extends Map<string, infer L> ? L : never): void {
    journal.calls.push(`ipcMain.handle(${channel})`);
    journal.ipcHandlers.set(channel, listener);
  },
  removeHandler(channel: string): void {
    journal.ipcHandlers.delete(channel);
  },
};

export const shell = {
  openExternal(): Promise<void> {
    return Promise.resolve();
  },
};

class StandInWebContents extends EventEmitter {
  readonly session = {
    setPermissionRequestHandler(): void {},
    webRequest: { onHeadersReceived(): void {} },
  };
  setWindowOpenHandler(): void {}
  send(): void {}
  isDestroyed(): boolean {
    return false;
  }
}

export class StandInWindow {
  readonly webContents = new StandInWebContents();
  constructor(readonly options: Record<string, unknown>) {
    journal.calls.push('new BrowserWindow');
    journal.windows.push(this);
  }
  static getAllWindows(): StandInWindow[] {
    return journal.windows;
  }
  loadURL(url: string): Promise<void> {
    journal.calls.push('window.loadURL');
    journal.loadedUrls.push(url);
    return Promise.resolve();
  }
  once(): this {
    return this;
  }
  show(): void {}
}

export { StandInWindow as BrowserWindow };
