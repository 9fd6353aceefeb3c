/**
 * The window's two clients over the real service, each as the window holds it:
 *
 * - web: `rolloff serve`'s pieces (openHostedService, startWebHost) on a real
 *   port, reached by renderer/client/http-client.ts (fetch; a WebSocket of the
 *   ws package in place of the browser's, which Node 20 lacks);
 * - desktop: the Electron shell's IPC wiring (main/ipc.ts, registerIpc) reached
 *   by renderer/client/bridge-client.ts through a bridge that carries every
 *   call, reply and event by structuredClone, the algorithm Electron's IPC
 *   serialises with (electronjs.org/docs/latest/api/ipc-renderer, "Structured
 *   Clone Algorithm"). Only ipcMain and the window's contents are stand-ins:
 *   the Electron binary cannot be installed here.
 */
import { openHostedService, type HostedService } from '../../../app/host/hosted-service';
import { startWebHost, type WebHost } from '../../../app/host/web-host';
import type { RendererFiles } from '../../../app/host/renderer-bundle';
import type { RolloffServiceOptions } from '../../../app/service/service';
import type { RolloffClient, ServiceEventName } from '../../../app/contract/contract';
import { registerIpc, type IpcInvokeEventLike } from '../../../main/ipc';
import { CALL_CHANNEL, EVENT_CHANNEL } from '../../../main/channels';
import { createHttpClient } from '../../../renderer/client/http-client';
import { createBridgeClient, type PreloadBridge } from '../../../renderer/client/bridge-client';
import { provideBrowserWebSocket } from '../../helpers/browser-websocket';

export type Transport = 'web' | 'desktop';

export interface WindowClient {
  client: RolloffClient;
  /** Events the client refused (contract-proxy.ts reports them instead of passing them on). */
  refusedEvents: Error[];
  hosted: HostedService;
  close(): Promise<void>;
}

/** The web host serves no page here: these tests are about the contract, the e2e tests serve the real bundle. */
const NO_PAGE: RendererFiles = new Map([['index.html', { contentType: 'text/html; charset=utf-8', body: Buffer.from('<!doctype html><title>Rolloff</title>') }]]);

const APP_URL = 'file:///opt/rolloff/out/electron/renderer/index.html';

export async function openWindowClient(transport: Transport, dbPath: string, options: RolloffServiceOptions): Promise<WindowClient> {
  const hosted = await openHostedService(dbPath, options);
  const refusedEvents: Error[] = [];
  const report = (error: Error) => refusedEvents.push(error);
  if (transport === 'web') {
    provideBrowserWebSocket();
    const host: WebHost = await startWebHost({ api: hosted.api, subscribe: hosted.subscribe, files: NO_PAGE, host: '127.0.0.1', port: 0, log: () => {} });
    let connected!: () => void;
    const open = new Promise<void>((resolve) => (connected = resolve));
    const client = createHttpClient(new URL(host.url), (isConnected) => isConnected && connected(), report);
    await open; // events sent before the socket is open would be lost
    const close = async () => {
      await host.close();
      await hosted.close();
    };
    return { client, refusedEvents, hosted, close };
  }
  let handler: ((event: IpcInvokeEventLike, ...args: unknown[]) => unknown) | undefined;
  const listeners = new Set<(name: ServiceEventName, payload: unknown) => void>();
  const wiring = registerIpc({
    ipcMain: { handle: (channel, listener) => channel === CALL_CHANNEL && (handler = listener), removeHandler: () => (handler = undefined) },
    api: hosted.api,
    windows: () => [{
      isDestroyed: () => false,
      send: (channel: string, name: unknown, payload: unknown) => {
        if (channel === EVENT_CHANNEL) for (const listener of listeners) listener(name as ServiceEventName, structuredClone(payload));
      },
    }],
    isTrustedSender: (url) => url === APP_URL,
    log: () => {},
  });
  const unsubscribe = hosted.subscribe((event, payload) => wiring.forward(event, payload));
  const bridge: PreloadBridge = {
    async call(method, args) {
      return structuredClone(await handler!({ senderFrame: { url: APP_URL } }, method, structuredClone(args))) as Awaited<ReturnType<PreloadBridge['call']>>;
    },
    on(event, listener) {
      const forward = (name: ServiceEventName, payload: unknown) => name === event && listener(payload);
      listeners.add(forward);
      return () => listeners.delete(forward);
    },
  };
  const client = createBridgeClient(bridge, report);
  return {
    client,
    refusedEvents,
    hosted,
    close: async () => {
      unsubscribe();
      wiring.dispose();
      await hosted.close();
    },
  };
}
