/**
 * The client in a plain browser: contract calls as POST /api/METHOD with a
 * JSON argument list, events over a WebSocket that reconnects after a drop.
 * contract-proxy.ts turns every method name into a call.
 */
import type { RolloffClient, ServiceEventName, ServiceEvents } from '../../app/contract/contract';
import { errorFromWire, type WireError } from './remote-error';
import { EventHub } from './event-hub';
import { contractProxy, type RefusedEventReporter } from './contract-proxy';

/**
 * `onConnection` hears when the event socket drops and comes back (events sent meanwhile are lost: views re-read);
 * `reportRefusedEvent` hears an event whose payload did not fit the contract (contract-proxy.ts).
 */
export function createHttpClient(base: URL, onConnection?: (connected: boolean) => void, reportRefusedEvent?: RefusedEventReporter): RolloffClient {
  const hub = new EventHub();
  if (onConnection) hub.onConnection(onConnection);
  connectEvents(base, hub);
  const call = async (method: string, args: unknown[]): Promise<unknown> => {
    let response: Response;
    try {
      response = await fetch(new URL(`api/${method}`, base), {
        method: 'POST',
        headers: { 'Content-Type': 'application/json' },
        body: JSON.stringify(args),
        credentials: 'same-origin',
      });
    } catch {
      throw errorFromWire({ user: true, message: 'The Rolloff host does not answer.', hint: 'Check that "rolloff serve" is still running, then reload this page.' }, '');
    }
    const body = (await response.json().catch(() => ({}))) as { result?: unknown; error?: WireError };
    if (!response.ok) throw errorFromWire(body.error, `The host refused ${method} (HTTP ${response.status}).`);
    return body.result;
  };
  return contractProxy(call, (event, listener) => hub.on(event, listener), reportRefusedEvent);
}

function connectEvents(base: URL, hub: EventHub, retryMs = 500): void {
  const url = new URL('events', base);
  url.protocol = base.protocol === 'https:' ? 'wss:' : 'ws:';
  url.search = '';
  const socket = new WebSocket(url);
  socket.addEventListener('open', () => hub.setConnected(true));
  socket.addEventListener('message', (message) => {
    const { event, payload } = JSON.parse(String(message.data)) as { event: ServiceEventName; payload: ServiceEvents[ServiceEventName] };
    hub.emit(event, payload);
  });
  socket.addEventListener('close', () => {
    hub.setConnected(false);
    setTimeout(() => connectEvents(base, hub, Math.min(retryMs * 2, 5_000)), retryMs);
  });
}
