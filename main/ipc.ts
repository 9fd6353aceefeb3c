/**
 * The contract over Electron IPC. One invoke channel carries (method, args);
 * every call is checked by the sender's URL, then goes through
 * app/host/call-service.ts (the contract's schemas) as the web host's calls do,
 * before anything reaches the service.
 * Replies are { ok, result } / { ok: false, error } because Electron turns a
 * thrown error into a bare string and would lose the hint.
 */
import type { RolloffApi, ServiceEventName } from '../app/contract/contract';
import { callService } from '../app/host/call-service';
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
    const outcome = await callService(options.api, method, args, (line) => log(`rolloff: ${line}`));
    return outcome.ok ? outcome : { ok: false, error: serializeError(outcome.error) };
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
