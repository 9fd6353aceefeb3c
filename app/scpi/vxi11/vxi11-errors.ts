/**
 * VXI-11 error codes (§B.5.2) as the session's named errors: an I/O timeout
 * is a timeout, a lost link is a disconnect, a lock held elsewhere is a
 * lock; the rest keep their code and meaning.
 */
import { ScpiDisconnectedError, ScpiLinkError, ScpiLockedError, ScpiTimeoutError, type ScpiError } from '../errors';
import { VXI11_ERROR_TEXT, Vxi11ErrorCode } from './protocol';

export interface FailureContext {
  link: string;
  /** The procedure, e.g. "device_read". */
  operation: string;
  /** The SCPI command the operation served, when there is one. */
  command?: string;
  ioTimeoutS: number;
  lockTimeoutS: number;
}

export function vxi11Failure(code: number, context: FailureContext): ScpiError {
  const meaning = VXI11_ERROR_TEXT[code] ?? 'unknown error code';
  switch (code) {
    case Vxi11ErrorCode.ioTimeout:
      return new ScpiTimeoutError(context.command ?? context.operation, context.ioTimeoutS, context.link);
    case Vxi11ErrorCode.deviceLockedByAnotherLink:
      return new ScpiLockedError(context.link, context.lockTimeoutS, context.operation);
    case Vxi11ErrorCode.invalidLinkId:
    case Vxi11ErrorCode.channelNotEstablished:
    case Vxi11ErrorCode.ioError:
      return new ScpiDisconnectedError(context.link, `${context.operation}: VXI-11 error ${code} (${meaning})`, context.command);
    default:
      return new ScpiLinkError(context.link, 'VXI-11', code, meaning, context.operation);
  }
}
