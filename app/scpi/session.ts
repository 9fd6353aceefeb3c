/**
 * A SCPI conversation with one instrument over any Transport. One command is
 * in flight at a time (IEEE 488.2 §6 message exchange: a query's reply must be
 * read before the next query), each with its own timeout. Replies are framed
 * here, not by a line parser, so binary block data passes intact.
 */
import { ValidationError } from '../errors';
import type { InstrumentIdentity } from '../contract/contract';
import { parseErrorEntry, type InstrumentErrorEntry } from './error-entry';
import { ScpiDisconnectedError, ScpiError, ScpiInstrumentError, ScpiMalformedReplyError, ScpiTimeoutError } from './errors';
import { parseIdentity } from './identity';
import { parseReading, type Reading } from './reading';
import { frameReply, frameResponseUnits, preview, type ResponseUnit } from './reply-framer';
import { OperationQueue } from './operation-queue';
import { TrafficLog } from './traffic-log';
import type { Transport } from './transport';

export interface SessionOptions {
  /** Default per-command timeout in seconds (wall clock). */
  timeoutS?: number;
  /** Shared traffic log; a private one is made when absent. */
  traffic?: TrafficLog;
  /** Upper bound on SYSTem:ERRor? reads in drainErrors (a stuck queue must not loop forever). */
  maxErrorReads?: number;
}

export interface CommandOptions {
  timeoutS?: number;
}

/** A reply as framed: a text line or a definite-length block. */
export type ScpiReply = { kind: 'text'; text: string } | { kind: 'block'; bytes: Uint8Array };
type Reply = ScpiReply | { kind: 'units'; units: ResponseUnit[] };

interface PendingReply {
  command: string;
  /** Several units separated by ';' are expected (a program message with several queries). */
  units: boolean;
  resolve(reply: Reply): void;
  reject(error: Error): void;
}

const encoder = new TextEncoder();
export const DEFAULT_TIMEOUT_S = 5;
const DEFAULT_MAX_ERROR_READS = 32;

export class ScpiSession {
  readonly traffic: TrafficLog;
  private readonly timeoutS: number;
  private readonly maxErrorReads: number;
  private buffer: Uint8Array = new Uint8Array(0);
  private pending: PendingReply | undefined;
  private readonly queue = new OperationQueue();
  private closedReason: string | undefined;
  private replyAtMs = Number.NaN;

  constructor(
    private readonly transport: Transport,
    options: SessionOptions = {},
  ) {
    this.timeoutS = options.timeoutS ?? DEFAULT_TIMEOUT_S;
    this.maxErrorReads = options.maxErrorReads ?? DEFAULT_MAX_ERROR_READS;
    this.traffic = options.traffic ?? new TrafficLog();
    transport.onData((bytes) => this.receive(bytes));
    transport.onClose((reason) => this.linkClosed(reason));
    if (!transport.isOpen) this.closedReason = 'not opened';
  }

  /** Opens the transport and returns a session on it. */
  static async open(transport: Transport, options: SessionOptions = {}): Promise<ScpiSession> {
    await transport.open();
    return new ScpiSession(transport, options);
  }

  get link(): string {
    return this.transport.description;
  }

  get isOpen(): boolean {
    return this.closedReason === undefined;
  }

  /** When the latest complete reply was framed and logged (performance.now() ms; NaN before the first): not before its traffic entry. */
  get lastReplyAtMs(): number {
    return this.replyAtMs;
  }

  /** Sends a command that has no reply. */
  write(command: string): Promise<void> {
    return this.enqueue(async () => {
      await this.send(command);
    });
  }

  /** Sends a query and returns its reply as text (terminator removed). */
  query(command: string, options: CommandOptions = {}): Promise<string> {
    return this.enqueue(async () => {
      const reply = await this.exchange(command, options);
      if (reply.kind !== 'text') throw new ScpiMalformedReplyError(command, reply.kind === 'block' ? `<block of ${reply.bytes.length} bytes>` : '<units>', 'a text reply');
      return reply.text;
    });
  }

  /** Sends a query whose reply is a definite-length block and returns the block's bytes. */
  queryBlock(command: string, options: CommandOptions = {}): Promise<Uint8Array> {
    return this.enqueue(async () => {
      const reply = await this.exchange(command, options);
      if (reply.kind !== 'block') throw new ScpiMalformedReplyError(command, reply.kind === 'text' ? reply.text : '<units>', 'a definite-length block (#<n><length><bytes>)');
      return reply.bytes;
    });
  }

  /** Sends a query and returns the reply as framed, text or block (for a raw console). */
  queryRaw(command: string, options: CommandOptions = {}): Promise<ScpiReply> {
    return this.enqueue(async () => {
      const reply = await this.exchange(command, options);
      if (reply.kind === 'units') throw new ScpiMalformedReplyError(command, '<units>', 'one reply');
      return reply;
    });
  }

  /**
   * Sends a program message with several queries (`A?;B?`) and returns the units
   * of its one response message in order, text or block: one round trip for
   * what would otherwise be several.
   */
  queryUnits(command: string, options: CommandOptions = {}): Promise<ResponseUnit[]> {
    return this.enqueue(async () => {
      const reply = await this.exchange(command, options, true);
      if (reply.kind !== 'units') throw new ScpiMalformedReplyError(command, '<one reply>', 'response units');
      return reply.units;
    });
  }

  /** Sends a query with one numeric reply, classifying SCPI overrange/NaN values. */
  async queryReading(command: string, options: CommandOptions = {}): Promise<Reading> {
    return parseReading(await this.query(command, options), command);
  }

  async identify(): Promise<InstrumentIdentity> {
    return parseIdentity(await this.query('*IDN?'));
  }

  /** *RST: instrument to its reset state (IEEE 488.2 §10.32, recalled from memory). */
  reset(): Promise<void> {
    return this.write('*RST');
  }

  /** *CLS: clears the status registers and the error queue (IEEE 488.2 §10.3, recalled from memory). */
  clearStatus(): Promise<void> {
    return this.write('*CLS');
  }

  /** *OPC?: waits until pending operations finish; the instrument answers "1". */
  async operationComplete(options: CommandOptions = {}): Promise<void> {
    const reply = await this.query('*OPC?', options);
    if (reply.trim() !== '1' && reply.trim() !== '+1') throw new ScpiMalformedReplyError('*OPC?', reply, '"1"');
  }

  /** *ESR?: reads and clears the standard event status register (0–255). */
  async eventStatus(): Promise<number> {
    const reply = await this.query('*ESR?');
    const value = Number(reply.trim());
    if (!Number.isInteger(value) || value < 0 || value > 255) throw new ScpiMalformedReplyError('*ESR?', reply, 'an integer 0–255');
    return value;
  }

  /**
   * Reads SYSTem:ERRor? until 0,"No error" and returns what was queued, oldest
   * first. Bounded: an instrument that never empties its queue stops us after
   * maxErrorReads reads rather than hanging the session.
   */
  async drainErrors(): Promise<InstrumentErrorEntry[]> {
    const entries: InstrumentErrorEntry[] = [];
    for (let i = 0; i < this.maxErrorReads; i++) {
      const entry = parseErrorEntry(await this.query('SYSTem:ERRor?'), 'SYSTem:ERRor?');
      if (entry.code === 0) return entries;
      entries.push(entry);
    }
    return entries;
  }

  /** Drains the error queue and throws the first entry as ScpiInstrumentError, naming `command`. */
  async throwIfErrors(command: string): Promise<void> {
    const entries = await this.drainErrors();
    if (entries.length > 0) throw new ScpiInstrumentError(entries[0].code, entries[0].message, command, this.link);
  }

  async close(): Promise<void> {
    await this.transport.close();
    this.linkClosed('closed by the application');
  }

  private enqueue<T>(operation: () => Promise<T>): Promise<T> {
    return this.queue.run(operation);
  }

  /** `reply`: the command is a query; a message-based transport then reads its response within timeoutS, or calls `failed`. */
  private async send(command: string, reply?: { timeoutS: number; failed: (error: Error) => void }): Promise<void> {
    if (/[\r\n]/.test(command)) throw new ValidationError('command', `"${command.replace(/[\r\n]/g, '⏎')}" contains a line break`, 'Send one command per line.');
    if (this.closedReason !== undefined) throw new ScpiDisconnectedError(this.link, this.closedReason, command);
    this.discardStaleInput();
    this.traffic.add('sent', command, this.link);
    try {
      await this.transport.write(encoder.encode(`${command}\n`), reply ? { replyExpected: true, timeoutS: reply.timeoutS, onReplyFailure: reply.failed } : undefined);
    } catch (error) {
      if (error instanceof ScpiError) throw error; // already named by the transport (a VXI-11 lock or timeout, say)
      throw new ScpiDisconnectedError(this.link, (error as Error).message ?? String(error), command);
    }
  }

  private exchange(command: string, options: CommandOptions, units = false): Promise<Reply> {
    const timeoutS = options.timeoutS ?? this.timeoutS;
    return new Promise<Reply>((resolve, reject) => {
      const timer = setTimeout(() => {
        if (this.pending !== pending) return;
        this.pending = undefined;
        reject(new ScpiTimeoutError(command, timeoutS, this.link));
      }, timeoutS * 1000);
      const pending: PendingReply = {
        command,
        units,
        resolve: (reply) => {
          clearTimeout(timer);
          resolve(reply);
        },
        reject: (error) => {
          clearTimeout(timer);
          reject(error);
        },
      };
      this.pending = pending;
      this.send(command, { timeoutS, failed: (error) => this.requestFailed(pending, error) }).then(
        () => this.deliver(),
        (error: Error) => {
          if (this.pending === pending) this.pending = undefined;
          pending.reject(error);
        },
      );
    });
  }

  private receive(bytes: Uint8Array): void {
    const joined = new Uint8Array(this.buffer.length + bytes.length);
    joined.set(this.buffer, 0);
    joined.set(bytes, this.buffer.length);
    this.buffer = joined;
    this.deliver();
  }

  /** Hands a complete reply (if any) to the waiting query. */
  private deliver(): void {
    const pending = this.pending;
    if (!pending) return;
    if (pending.units) return this.deliverUnits(pending);
    const frame = frameReply(this.buffer);
    if (frame.kind === 'incomplete') return;
    this.buffer = this.buffer.slice(frame.consumed);
    this.pending = undefined;
    if (frame.kind === 'text') {
      this.traffic.add('received', frame.text, this.link);
      this.replyAtMs = performance.now();
      pending.resolve({ kind: 'text', text: frame.text });
    } else if (frame.kind === 'block') {
      this.traffic.add('received', `<block of ${frame.bytes.length} bytes>`, this.link);
      this.replyAtMs = performance.now();
      pending.resolve({ kind: 'block', bytes: frame.bytes });
    } else {
      this.traffic.add('received', `<malformed> ${frame.preview}`, this.link);
      pending.reject(new ScpiMalformedReplyError(pending.command, frame.preview, frame.description));
    }
  }

  private deliverUnits(pending: PendingReply): void {
    const frame = frameResponseUnits(this.buffer);
    if (frame.kind === 'incomplete') return;
    this.buffer = this.buffer.slice(frame.consumed);
    this.pending = undefined;
    if (frame.kind === 'units') {
      this.traffic.add('received', frame.units.map((u) => (u.kind === 'text' ? u.text : `<block of ${u.bytes.length} bytes>`)).join(';'), this.link);
      this.replyAtMs = performance.now();
      pending.resolve(frame);
    } else {
      this.traffic.add('received', `<malformed> ${frame.preview}`, this.link);
      pending.reject(new ScpiMalformedReplyError(pending.command, frame.preview, frame.description));
    }
  }

  /**
   * Bytes that arrived while no query was waiting (a reply that came after its
   * timeout, line noise) would be taken for the next reply; drop them before
   * sending. Common practice on links without a device-clear signal.
   */
  private discardStaleInput(): void {
    if (this.buffer.length === 0) return;
    this.traffic.add('received', `<discarded ${this.buffer.length} stale bytes> ${preview(this.buffer.subarray(0, 60))}`, this.link);
    this.buffer = new Uint8Array(0);
  }

  /** A message-based transport could not get this query's response (its own timeout, a lock): the query fails with that error. */
  private requestFailed(pending: PendingReply, error: Error): void {
    if (this.pending !== pending) return; // it already timed out here; a later query is not its to fail
    this.pending = undefined;
    pending.reject(error);
  }

  private linkClosed(reason: string): void {
    if (this.closedReason !== undefined) return;
    this.closedReason = reason;
    const pending = this.pending;
    this.pending = undefined;
    pending?.reject(new ScpiDisconnectedError(this.link, reason, pending.command));
  }
}
