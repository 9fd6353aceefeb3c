/**
 * Errors cross IPC and HTTP as plain JSON. User errors keep their message,
 * hint and field so the window can show them; anything else is a bug, whose
 * details stay in the host's log rather than in a reply to a caller.
 */
import { UserError, ValidationError } from '../errors';

export interface SerializedError {
  /** Error class name, e.g. "ValidationError", so a window can tell failures apart. */
  name: string;
  message: string;
  hint?: string;
  where?: string;
  /** True for errors a user can act on (UserError and subclasses). */
  user: boolean;
}

export function serializeError(error: unknown): SerializedError {
  if (error instanceof UserError) {
    const serialized: SerializedError = { name: error.name, message: error.message, user: true };
    if (error.hint) serialized.hint = error.hint;
    if (error instanceof ValidationError) serialized.where = error.where;
    return serialized;
  }
  return {
    name: 'InternalError',
    message: 'The service failed unexpectedly; the details are in its log.',
    hint: 'Nothing you did should cause this: please report it with what you were doing.',
    user: false,
  };
}

/** HTTP status for a failed call: bad input 400, refused by the service 422, bug 500. */
export function httpStatusFor(error: unknown): number {
  if (error instanceof ValidationError) return 400;
  if (error instanceof UserError) return 422;
  return 500;
}
