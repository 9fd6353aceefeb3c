/**
 * Standard SCPI error codes the simulated instruments queue (SCPI-1999
 * Vol. 2 §21.8 error list — clause recalled from memory; the codes and texts
 * are the standard ones).
 */
export const SCPI_ERRORS = {
  commandError: [-100, 'Command error'],
  invalidCharacter: [-101, 'Invalid character'],
  dataTypeError: [-104, 'Data type error'],
  parameterNotAllowed: [-108, 'Parameter not allowed'],
  missingParameter: [-109, 'Missing parameter'],
  undefinedHeader: [-113, 'Undefined header'],
  executionError: [-200, 'Execution error'],
  settingsConflict: [-221, 'Settings conflict'],
  dataOutOfRange: [-222, 'Data out of range'],
  illegalParameterValue: [-224, 'Illegal parameter value'],
  dataStale: [-230, 'Data corrupt or stale'],
  queueOverflow: [-350, 'Queue overflow'],
  queryInterrupted: [-410, 'Query INTERRUPTED'],
} as const satisfies Record<string, readonly [number, string]>;

export type ScpiErrorName = keyof typeof SCPI_ERRORS;

/** Thrown by a command handler; the instrument queues it instead of replying. */
export class SimCommandError extends Error {
  readonly code: number;
  readonly text: string;
  constructor(name: ScpiErrorName, detail?: string) {
    const [code, text] = SCPI_ERRORS[name];
    // SCPI allows device-dependent detail after a semicolon inside the quoted message.
    super(detail ? `${text}; ${detail}` : text);
    this.code = code;
    this.text = this.message;
  }
}

/**
 * The instrument's error queue: first in, first out, bounded; when full the
 * newest entry is replaced by -350 "Queue overflow" (SCPI-1999 Vol. 1 §21.8,
 * recalled from memory).
 */
export class SimErrorQueue {
  private readonly entries: Array<{ code: number; message: string }> = [];
  constructor(private readonly capacity = 20) {}

  push(code: number, message: string): void {
    if (this.entries.length < this.capacity) {
      this.entries.push({ code, message });
    } else {
      this.entries[this.capacity - 1] = { code: SCPI_ERRORS.queueOverflow[0], message: SCPI_ERRORS.queueOverflow[1] };
    }
  }

  next(): { code: number; message: string } {
    return this.entries.shift() ?? { code: 0, message: 'No error' };
  }

  clear(): void {
    this.entries.length = 0;
  }

  get size(): number {
    return this.entries.length;
  }
}
