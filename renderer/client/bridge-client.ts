/**
 * The client inside the Electron window: the preload exposes `rolloff.call`
 * and `rolloff.on` through contextBridge; this wraps them in the same shape
 * as the HTTP client.
 */
import type { RolloffClient, ServiceEventName } from '../../app/contract/contract';
import { errorFromWire, type WireError } from './remote-error';
import { contractProxy, type RefusedEventReporter } from './contract-proxy';

/** What main/preload.ts exposes on window.rolloff. */
export interface PreloadBridge {
  call(method: string, args: unknown[]): Promise<{ ok: true; result: unknown } | { ok: false; error: WireError }>;
  on(event: ServiceEventName, listener: (payload: unknown) => void): () => void;
}

/** `reportRefusedEvent` hears an event whose payload did not fit the contract (contract-proxy.ts). */
export function createBridgeClient(bridge: PreloadBridge, reportRefusedEvent?: RefusedEventReporter): RolloffClient {
  const call = async (method: string, args: unknown[]): Promise<unknown> => {
    const reply = await bridge.call(method, args);
    if (!reply.ok) throw errorFromWire(reply.error, `${method} failed.`);
    return reply.result;
  };
  return contractProxy(call, (event, listener) => bridge.on(event, listener), reportRefusedEvent);
}
