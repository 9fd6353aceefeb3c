/**
 * The window's check of what comes back from the host: every method's result
 * against API_RESULTS and every event's payload against SERVICE_EVENT_SCHEMAS,
 * at the one place both of the window's clients go through
 * (renderer/client/contract-proxy.ts). Calls are checked on the way in by
 * check-call.ts; this is the same contract read the other way.
 *
 * A reply that does not fit is refused with an UnexpectedReplyError naming the
 * method or event and the field (`getRun() result.points.gainDb[3]`), what was
 * expected and what arrived, and a hint: the window and the host it talks to
 * are most likely of different versions, or the host is faulty. A reply that
 * fits is handed on exactly as it arrived.
 */
import type * as v from 'valibot';
import { UnexpectedReplyError } from '../errors';
import { API_RESULTS, type RolloffApi, type RolloffMethodName } from './contract';
import { SERVICE_EVENT_SCHEMAS, type ServiceEvents } from './event-schemas';
import type { ServiceEventName } from './events';
import { checkOrProblem } from './field-schemas';

export const REPLY_MISMATCH_HINT =
  'The Rolloff host and this window are most likely different versions (reload the window; if that does not help, run the same version on both), or the host is faulty: report it with what you were doing.';

/** What a method resolves to, as the contract declares it. */
export type ApiResult<M extends RolloffMethodName> = Awaited<ReturnType<RolloffApi[M]>>;

/** Checks what a method resolved to; returns it unchanged, or throws UnexpectedReplyError. */
export function checkResult<M extends RolloffMethodName>(method: M, value: unknown): ApiResult<M> {
  if (!Object.prototype.hasOwnProperty.call(API_RESULTS, method)) {
    throw new UnexpectedReplyError(`${String(method).slice(0, 80)}()`, 'is not a method this window knows, so its result cannot be checked', REPLY_MISMATCH_HINT);
  }
  return checkReply(API_RESULTS[method], value, `${method}() result`) as ApiResult<M>;
}

/** Checks an event's payload; returns it unchanged, or throws UnexpectedReplyError. */
export function checkEvent<E extends ServiceEventName>(event: E, payload: unknown): ServiceEvents[E] {
  if (!Object.prototype.hasOwnProperty.call(SERVICE_EVENT_SCHEMAS, event)) {
    throw new UnexpectedReplyError(`"${String(event).slice(0, 80)}" event`, 'is not an event this window knows', REPLY_MISMATCH_HINT);
  }
  return checkReply(SERVICE_EVENT_SCHEMAS[event], payload, `${event} event`) as ServiceEvents[E];
}

function checkReply(schema: v.GenericSchema, value: unknown, where: string): unknown {
  const result = checkOrProblem(schema, value);
  if ('problem' in result) throw new UnexpectedReplyError(where + result.problem.path, result.problem.message, REPLY_MISMATCH_HINT);
  return value;
}
