/**
 * Named failures of the instrument link, so a caller can tell "retry"
 * (timeout), "reconnect" (disconnected), "stop and tell the user" (instrument
 * error) and "the instrument said something we cannot read" apart by type.
 */
import { UserError } from '../errors';

/** Base of every failure on an instrument link. */
export class ScpiError extends UserError {}

/** No complete reply within the command's time limit. */
export class ScpiTimeoutError extends ScpiError {
  readonly command: string;
  readonly timeoutS: number;
  constructor(command: string, timeoutS: number, link: string) {
    super(
      `${link}: no reply to "${command}" within ${timeoutS} s`,
      'Check that the instrument is powered, the cable and address are right, and the serial settings (baud, parity) match the instrument. A slow command may need a longer timeout.',
    );
    this.command = command;
    this.timeoutS = timeoutS;
  }
}

/** The link closed (cable pulled, instrument off, socket reset). */
export class ScpiDisconnectedError extends ScpiError {
  readonly reason: string;
  constructor(link: string, reason: string, command?: string) {
    super(
      `${link}: link closed${command ? ` while sending "${command}"` : ''} (${reason})`,
      'Reconnect the instrument (cable, power, network) and open the session again.',
    );
    this.reason = reason;
  }
}

/** The instrument reported an error in its error queue (SCPI-1999 SYSTem:ERRor). */
export class ScpiInstrumentError extends ScpiError {
  readonly code: number;
  readonly instrumentMessage: string;
  readonly command: string;
  constructor(code: number, instrumentMessage: string, command: string, link: string) {
    super(
      `${link}: instrument reported error ${code} "${instrumentMessage}" after "${command}"`,
      'Check the command against the instrument\'s programming manual, or fix the profile template that produced it.',
    );
    this.code = code;
    this.instrumentMessage = instrumentMessage;
    this.command = command;
  }
}

/** A reply arrived but does not have the form the query expects. */
export class ScpiMalformedReplyError extends ScpiError {
  readonly command: string;
  readonly reply: string;
  constructor(command: string, reply: string, expected: string) {
    const shown = reply.length > 80 ? `${reply.slice(0, 80)}…` : reply;
    super(
      `reply to "${command}" is not ${expected}: ${JSON.stringify(shown)}`,
      'The instrument may be on a different baud rate or in a different mode, or the profile may not match it.',
    );
    this.command = command;
    this.reply = reply;
  }
}

/** An instrument address that is not one of the accepted forms. */
export class AddressError extends ScpiError {
  readonly address: string;
  constructor(address: string, problem: string) {
    super(
      `address "${address}": ${problem}`,
      'Accepted forms: serial:///dev/ttyUSB0?baud=9600&data=8&parity=none&stop=1&flow=none, /dev/ttyUSB0, ' +
        'tcp://HOST:5025, HOST:PORT, ASRL/dev/ttyUSB0::INSTR, ASRL3::INSTR, TCPIP::HOST::5025::SOCKET, TCPIP0::HOST::PORT::SOCKET, ' +
        'TCPIP::HOST::INSTR, TCPIP0::HOST::inst0::INSTR (VXI-11), USB0::0xVVVV::0xPPPP::SERIAL::INSTR, /dev/usbtmc0 (USBTMC).',
    );
    this.address = address;
  }
}

/** Another client holds the instrument's lock (VXI-11 error 11): retry once it lets go. */
export class ScpiLockedError extends ScpiError {
  readonly lockTimeoutS: number;
  constructor(link: string, lockTimeoutS: number, operation: string) {
    super(
      `${link}: the instrument is locked by another connection (${operation}${lockTimeoutS > 0 ? `, waited ${lockTimeoutS} s` : ''})`,
      'Another program holds the instrument\'s lock. Close it (or let its run finish) and try again, or allow a longer lock wait.',
    );
    this.lockTimeoutS = lockTimeoutS;
  }
}

/** A message-based link (VXI-11, USBTMC) refused an operation for a reason of its own, named by its code. */
export class ScpiLinkError extends ScpiError {
  readonly protocol: string;
  readonly code: number;
  constructor(link: string, protocol: string, code: number, meaning: string, operation: string) {
    super(
      `${link}: ${operation} failed: ${protocol} error ${code} (${meaning})`,
      'The instrument refused the link operation. Check the address (device name, e.g. inst0), then power-cycle or reconnect the instrument if it persists.',
    );
    this.protocol = protocol;
    this.code = code;
  }
}
