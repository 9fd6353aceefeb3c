/**
 * Both clients (preload bridge, HTTP) as a RolloffClient: a Proxy turns every
 * method name into a call, so no client repeats the contract's method list
 * (the host validates the name). `then` stays undefined so awaiting a client
 * does not mistake it for a promise.
 *
 * This is also where the window checks what comes back, for both clients
 * alike (app/contract/check-reply.ts): a result that does not fit its
 * method's schema rejects the call with an UnexpectedReplyError, which the
 * view shows as it shows any failed call; an event that does not fit is not
 * passed to the listeners and is reported instead, once per event and field
 * (a faulty host would otherwise repeat it with every point).
 */
import type { RolloffClient, RolloffMethodName, ServiceEventName } from '../../app/contract/contract';
import { checkEvent, checkResult } from '../../app/contract/check-reply';
import { UnexpectedReplyError } from '../../app/errors';

/** Hears an event that was refused (the window shows it as a notice). */
export type RefusedEventReporter = (error: Error) => void;

export function contractProxy(
  call: (method: string, args: unknown[]) => Promise<unknown>,
  on: (event: ServiceEventName, listener: (payload: unknown) => void) => () => void,
  reportRefusedEvent: RefusedEventReporter = (error) => console.error(error),
): RolloffClient {
  const reported = new Set<string>();
  const checkedOn = (event: ServiceEventName, listener: (payload: never) => void) =>
    on(event, (payload) => {
      let checked: unknown;
      try {
        checked = checkEvent(event, payload);
      } catch (error) {
        // Once per event and field: the value that arrived may differ each time, the problem does not.
        const where = error instanceof UnexpectedReplyError ? error.where : String(error);
        if (!reported.has(where)) {
          reported.add(where);
          reportRefusedEvent(error as Error);
        }
        return;
      }
      listener(checked as never);
    });
  return new Proxy({} as RolloffClient, {
    get(_target, name) {
      if (name === 'on') return checkedOn;
      if (typeof name !== 'string' || name === 'then') return undefined;
      return async (...args: unknown[]) => checkResult(name as RolloffMethodName, await call(name, args));
    },
  });
}
