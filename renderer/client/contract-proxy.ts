/**
 * Both clients (preload bridge, HTTP) as a RolloffClient: a Proxy turns every
 * method name into a call, so no client repeats the contract's method list
 * (the host validates the name). `then` stays undefined so awaiting a client
 * does not mistake it for a promise.
 */
import type { RolloffClient, ServiceEventName } from '../../app/contract/contract';

export function contractProxy(
  call: (method: string, args: unknown[]) => Promise<unknown>,
  on: (event: ServiceEventName, listener: (payload: unknown) => void) => () => void,
): RolloffClient {
  return new Proxy({} as RolloffClient, {
    get(_target, name) {
      if (name === 'on') return on;
      if (typeof name !== 'string' || name === 'then') return undefined;
      return (...args: unknown[]) => call(name, args);
    },
  });
}
