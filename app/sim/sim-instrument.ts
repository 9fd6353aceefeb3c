/**
 * Base of a simulated instrument: a command table, the IEEE 488.2 common
 * commands, an error queue and the standard event status register. Subclasses
 * add their subsystem commands. Transport-free: link-server.ts feeds it lines.
 */
import type { InstrumentIdentity } from '../contract/contract';
import { formatErrorEntry } from '../scpi/error-entry';
import { formatIdentity } from '../scpi/identity';
import { HeaderPattern, splitProgramMessage, type ProgramUnit } from './program-message';
import { SimCommandError, SimErrorQueue } from './scpi-errors';
import type { BenchClock } from '../bench/clock';

export type SimReply = string | Uint8Array;

export interface CommandContext {
  params: string[];
  suffixes: number[];
  header: string;
}

export type CommandHandler = (context: CommandContext) => SimReply | void | Promise<SimReply | void>;

/** Standard event status register bits (IEEE 488.2 §11.5.1.1, recalled from memory). */
const ESR_OPERATION_COMPLETE = 1;
const ESR_QUERY_ERROR = 4;
const ESR_EXECUTION_ERROR = 16;
const ESR_COMMAND_ERROR = 32;

export const SIMULATED_MANUFACTURER = 'Rolloff simulated bench (simulated)';

export abstract class SimInstrument {
  readonly errors = new SimErrorQueue();
  private readonly commands: Array<{ pattern: HeaderPattern; handler: CommandHandler }> = [];
  /** Headers this instrument behaves as if it did not have (the unknown-headers fault). */
  private refused: HeaderPattern[] = [];
  private eventStatus = 0;
  /** Commands with this header are refused (-222) and not applied: the `refuse` fault. */
  refusing: HeaderPattern | undefined;

  constructor(
    readonly identity: InstrumentIdentity,
    protected readonly clock: BenchClock,
  ) {
    this.define('*IDN?', () => formatIdentity(this.identity));
    this.define('*RST', () => this.reset());
    this.define('*CLS', () => {
      this.errors.clear();
      this.eventStatus = 0;
    });
    this.define('*ESR?', () => {
      const value = this.eventStatus;
      this.eventStatus = 0;
      return String(value);
    });
    this.define('*OPC', () => {
      this.eventStatus |= ESR_OPERATION_COMPLETE;
    });
    this.define('*OPC?', async () => {
      await this.pendingOperations();
      return '1';
    });
    this.define('*WAI', () => this.pendingOperations());
    this.define('SYSTem:ERRor[:NEXT]?', () => formatErrorEntry(this.errors.next()));
  }

  /** Restores the power-on settings. */
  protected abstract reset(): void;

  /** Resolves when overlapped operations (e.g. an acquisition) are done. */
  protected async pendingOperations(): Promise<void> {}

  protected define(pattern: string, handler: CommandHandler): void {
    this.commands.push({ pattern: new HeaderPattern(pattern), handler });
  }

  /**
   * Executes one program message (a line without its terminator) and returns
   * the response message, or undefined when it has no queries. Errors are
   * queued, never thrown: a bad command must not stop the instrument.
   */
  async execute(message: string): Promise<SimReply | undefined> {
    return (await this.run(message)).reply;
  }

  /**
   * execute(), and when the reply was determined (performance.now() ms): when execution began (`beganAtMs`,
   * by default now: the link passes when the message arrived, or when the one before was done), or,
   * if a unit waited — an asynchronous handler (*OPC?, a reading, a record's data) — when the last
   * such handler finished. The link's latency counts from then: the simulation's own computing
   * before it (parsing, matching, synchronous handlers) is not added on top, as a real instrument's
   * stated reply time includes its processing; anything that waits counts in full.
   */
  async run(message: string, beganAtMs = performance.now()): Promise<{ reply: SimReply | undefined; readyAtMs: number }> {
    let readyAtMs = beganAtMs;
    const replies: SimReply[] = [];
    let units: ProgramUnit[];
    try {
      if (/[^\x20-\x7e\t]/.test(message)) throw new SimCommandError('invalidCharacter');
      units = splitProgramMessage(message);
      if (this.oneUnitPerMessage && units.length > 1) throw new SimCommandError('commandError', 'one command per message (no ";")');
    } catch (error) {
      this.queue(error);
      return { reply: undefined, readyAtMs };
    }
    for (const unit of units) {
      const reply = await this.executeUnit(unit, () => (readyAtMs = performance.now()));
      if (reply !== undefined) replies.push(reply);
    }
    return { reply: joinReplies(replies), readyAtMs };
  }

  /** The no-joined-messages fault: only one program message unit per message. */
  oneUnitPerMessage = false;

  /** From now on, headers matching these SCPI patterns queue −113 "Undefined header" (empty: none). */
  refuseHeaders(patterns: readonly string[]): void {
    this.refused = patterns.map((p) => new HeaderPattern(p));
  }

  /** `waited` is called when an asynchronous handler has finished (see run). */
  private async executeUnit(unit: ProgramUnit, waited: () => void): Promise<SimReply | undefined> {
    if (this.refusing?.match(unit.header)) {
      this.queue(new SimCommandError('dataOutOfRange', `${unit.header} refused (simulated fault)`));
      return undefined;
    }
    if (this.refused.some((pattern) => pattern.match(unit.header))) {
      this.queue(new SimCommandError('undefinedHeader', unit.header));
      return undefined;
    }
    for (const { pattern, handler } of this.commands) {
      const suffixes = pattern.match(unit.header);
      if (!suffixes) continue;
      try {
        const result = handler({ params: unit.params, suffixes, header: unit.header });
        if (!(result instanceof Promise)) return result === undefined ? undefined : result;
        try {
          return (await result) ?? undefined;
        } finally {
          waited();
        }
      } catch (error) {
        this.queue(error);
        return undefined;
      }
    }
    this.queue(new SimCommandError('undefinedHeader', unit.header));
    return undefined;
  }

  private queue(error: unknown): void {
    if (!(error instanceof SimCommandError)) {
      this.errors.push(-200, `Execution error; ${(error as Error)?.message ?? String(error)}`);
      this.eventStatus |= ESR_EXECUTION_ERROR;
      return;
    }
    this.errors.push(error.code, error.text);
    if (error.code <= -100 && error.code > -200) this.eventStatus |= ESR_COMMAND_ERROR;
    else if (error.code <= -200 && error.code > -300) this.eventStatus |= ESR_EXECUTION_ERROR;
    else if (error.code <= -400 && error.code > -500) this.eventStatus |= ESR_QUERY_ERROR;
  }
}

/** The response message of a program message's replies: none, one, or several separated by ';'. */
function joinReplies(replies: SimReply[]): SimReply | undefined {
  if (replies.length === 0) return undefined;
  if (replies.length === 1) return replies[0];
  // Several query replies in one response message are separated by ';' (IEEE 488.2 §8.4.1, recalled).
  // Joined as bytes: a block unit is binary and must pass unchanged.
  if (replies.every((r) => typeof r === 'string')) return replies.join(';');
  const parts = replies.map((r) => (typeof r === 'string' ? new TextEncoder().encode(r) : r));
  const joined = new Uint8Array(parts.reduce((sum, p) => sum + p.length, 0) + parts.length - 1);
  let at = 0;
  parts.forEach((part, i) => {
    if (i > 0) joined[at++] = 0x3b; // ';'
    joined.set(part, at);
    at += part.length;
  });
  return joined;
}
