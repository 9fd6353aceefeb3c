/**
 * Rebuilds an error that crossed IPC or HTTP as JSON, so views show the same
 * message and hint the service raised and can still tell a validation error
 * from other failures by type.
 */
import { UserError, ValidationError } from '../../app/errors';

export interface WireError {
  name?: string;
  message?: string;
  hint?: string;
  where?: string;
  user?: boolean;
}

export function errorFromWire(wire: WireError | undefined, fallback: string): Error {
  const message = wire?.message ?? fallback;
  if (wire?.where !== undefined && wire.name === 'ValidationError') {
    const prefix = `${wire.where}: `;
    const error = new ValidationError(wire.where, message.startsWith(prefix) ? message.slice(prefix.length) : message, wire.hint);
    return error;
  }
  if (wire?.user) {
    const error = new UserError(message, wire.hint);
    if (wire.name) error.name = wire.name;
    return error;
  }
  return new Error(message);
}
