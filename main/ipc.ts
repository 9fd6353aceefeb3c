/**
 * The contract over Electron IPC. One invoke channel carries (method, args);
 * every call is checked by validate-arguments.ts — the same check the web host
 * uses — and by the sender's URL, before anything reaches the service.
 * Replies are { ok, result } / { ok: false, error } because Electron turns a
 * thrown error into a bare string and would lose the hint.
 */
import type { RolloffApi, ServiceEventName } from '../app/service/contract';
import { validateCall } from '../app/service/validate-arguments';
import { serializeError, type SerializedError } from '../app/host/wire-error';
import { UserError } from '../app/errors';
import { CALL_CHANNEL, EVENT_CHANNEL } from './channels';

/** The part of Electron's ipcMain used here (injected so tests can pass a fake). */
export interface IpcMainLike {
  handle(channel: string, listener: (event: IpcInvokeEventLike, ...args: unknown[]) => unknown): void;
  removeHandler(channel: string): void;
}

export interface IpcInvokeEventLike {
  senderFrame: { url: string } | null;
}

export interface WebContentsLike {
  send(channel: string, ...args: unknown[]): void;
  isDestroyed(): boolean;
}

export type CallReply = { ok: true; result: unknown } | { ok: false; error: SerializedError };

export interface IpcWiring {
  /** Forwards one service event to every open window. */
  forward(event: ServiceEventName, payload: unknown): void;
  dispose(): void;
}

export function registerIpc(options: {
  ipcMain: IpcMainLike;
  api: RolloffApi;
  /** Windows to forward events to (looked up per event: windows come and go). */
  windows: () => WebContentsLike[];
  /** True for URLs of our own renderer; anything else may not call the service. */
  isTrustedSender: (url: string) => boolean;
  log?: (line: string) => void;
}): IpcWiring {
  const log = options.log ?? ((line: string) => process.stderr.write(line + '\n'));
  options.ipcMain.handle(CALL_CHANNEL, async (event, method, args): Promise<CallReply> => {
    const senderUrl = event.senderFrame?.url ?? '';
    if (!options.isTrustedSender(senderUrl)) {
      return { ok: false, error: serializeError(new UserError(`Calls from ${senderUrl.slice(0, 80) || 'an unknown frame'} are refused.`, 'Only the Rolloff window may call the service.')) };
    }
    let call: ReturnType<typeof validateCall>;
    try {
      call = validateCall(method, args);
    } catch (error) {
      return { ok: false, error: serializeError(error) };
    }
    try {
      const fn = options.api[call.method] as (...values: unknown[]) => Promise<unknown>;
      return { ok: true, result: (await fn.apply(options.api, call.args)) ?? null };
    } catch (error) {
      if (!(error instanceof UserError)) log(`rolloff: ${call.method} failed: ${(error as Error)?.stack ?? String(error)}`);
      return { ok: false, error: serializeError(error) };
    }
  });
  return {
    forward(event, payload) {
      for (const contents of options.windows()) if (!contents.isDestroyed()) contents.send(EVENT_CHANNEL, event, payload);
    },
    dispose() {
      options.ipcMain.removeHandler(CALL_CHANNEL);
    },
  };
}
