/**
 * One call from a window into the service, as both hosts (Electron IPC, web
 * host) make it: app/contract/check-call.ts checks the untrusted (method, args)
 * first, then the method runs. Failures come back as values for the host to
 * put in its own envelope; only failures that are not user errors (bugs) are
 * logged, with their stack, which never goes into a reply.
 */
import type { RolloffApi } from '../contract/contract';
import { validateCall } from '../contract/check-call';
import { UserError } from '../errors';

export type ServiceCallOutcome = { ok: true; result: unknown } | { ok: false; error: unknown };

export async function callService(api: RolloffApi, method: unknown, args: unknown, logBug: (line: string) => void): Promise<ServiceCallOutcome> {
  let call: ReturnType<typeof validateCall>;
  try {
    call = validateCall(method, args);
  } catch (error) {
    return { ok: false, error };
  }
  try {
    const fn = api[call.method] as (...values: unknown[]) => Promise<unknown>;
    return { ok: true, result: (await fn.apply(api, call.args)) ?? null };
  } catch (error) {
    if (!(error instanceof UserError)) logBug(`${call.method} failed: ${(error as Error)?.stack ?? String(error)}`);
    return { ok: false, error };
  }
}
