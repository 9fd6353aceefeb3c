/**
 * Serves one simulated instrument over one byte link (a TCP socket, the
 * instrument end of a PTY pair, or a VXI-11 link's device_write data): splits
 * incoming bytes into program messages at LF (CR LF accepted), executes them
 * in order, writes each response message with an LF terminator, and applies
 * link latency and faults.
 *
 * Framing: the command input is line-framed by @serialport/parser-readline.
 * Line framing is right here because the program messages these instruments
 * take are ASCII with no definite-length blocks (no waveform upload), so an
 * LF inside a message cannot occur. The other direction is not line-framed:
 * replies can be binary blocks holding any byte, and the client side frames
 * them by their byte count (app/scpi/reply-framer.ts).
 */
import { ReadlineParser } from '@serialport/parser-readline';
import { SeededRandom } from '../numeric';
import { realClock } from '../bench/clock';
import type { FaultState } from './faults';
import type { SimInstrument, SimReply } from './sim-instrument';

export interface ByteLink {
  write(bytes: Uint8Array): void;
}

export interface LinkOptions {
  /** Wall-clock delay before each reply (link and instrument processing time). */
  latencyS: number;
  faults: FaultState;
  random: SeededRandom;
}

const LF = 0x0a;
/** A program message longer than this without LF is noise; it is dropped. */
const MAX_MESSAGE_BYTES = 64 * 1024;
const encoder = new TextEncoder();

export class InstrumentLink {
  private lines = this.lineParser();
  /** Bytes received since the last LF, to drop a run-away unterminated message. */
  private unterminatedBytes = 0;
  private chain: Promise<void> = Promise.resolve();
  private closed = false;
  /** When the instrument finished its latest message (performance.now() ms): the next one begins no sooner. */
  private idleSinceMs = 0;

  constructor(
    private readonly instrument: SimInstrument,
    private readonly link: ByteLink,
    private readonly options: LinkOptions,
  ) {}

  receive(bytes: Uint8Array): void {
    const lastLf = bytes.lastIndexOf(LF);
    this.unterminatedBytes = lastLf < 0 ? this.unterminatedBytes + bytes.length : bytes.length - lastLf - 1;
    if (this.unterminatedBytes > MAX_MESSAGE_BYTES) {
      // Noise, not a program message: start again with an empty line buffer.
      this.lines.destroy();
      this.lines = this.lineParser();
      this.unterminatedBytes = 0;
      return;
    }
    this.lines.write(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength));
  }

  close(): void {
    this.closed = true;
    this.lines.destroy();
  }

  private lineParser(): ReadlineParser {
    // latin1: one character per byte, so a stray non-ASCII byte reaches the instrument (which refuses it with -101) unchanged.
    const parser = new ReadlineParser({ delimiter: '\n', encoding: 'latin1' });
    parser.on('data', (line: string) => {
      const message = line.endsWith('\r') ? line.slice(0, -1) : line;
      const arrivedAtMs = performance.now();
      this.chain = this.chain.then(() => this.handle(message, arrivedAtMs));
    });
    return parser;
  }

  private async handle(message: string, arrivedAtMs: number): Promise<void> {
    try {
      await this.reply(message, arrivedAtMs);
    } finally {
      this.idleSinceMs = performance.now();
    }
  }

  private async reply(message: string, arrivedAtMs: number): Promise<void> {
    if (this.closed || message.trim() === '') return;
    const hung = this.options.faults.current?.kind === 'hang';
    await this.options.faults.whileHung();
    if (this.closed) return;
    // The instrument takes the message up when it has arrived and the one before is done (or a hang is over),
    // not when this process's event loop gets round to it: a turn of the loop is the simulation's, not the
    // instrument's.
    const beganAtMs = hung ? performance.now() : Math.max(arrivedAtMs, this.idleSinceMs);
    let execution: { reply: SimReply | undefined; readyAtMs: number };
    try {
      execution = await this.instrument.run(message, beganAtMs);
    } catch {
      return; // run() queues its own errors; anything else must not stop the link
    }
    const { reply, readyAtMs } = execution;
    if (reply === undefined || this.closed) return;
    const fault = this.options.faults.current;
    // The latency counts from the moment the reply was determined (SimInstrument.run), so the simulation's
    // own computing is not added to it; the clock's sleep never ends early, so a reply never comes sooner.
    let delayS = Math.max(0, this.options.latencyS - (performance.now() - readyAtMs) / 1000);
    if (fault?.kind === 'slow') delayS += fault.delayS;
    if (delayS > 0) await realClock.sleepS(delayS);
    if (this.closed) return;
    if (fault?.kind === 'no-reply' && this.options.random.nextUniform() < (fault.probability ?? 1)) return;
    if (fault?.kind === 'garbage' && this.options.random.nextUniform() < (fault.probability ?? 1)) {
      this.link.write(this.garbage());
      return;
    }
    this.link.write(encodeReply(reply));
  }

  private garbage(): Uint8Array {
    const length = 1 + Math.floor(this.options.random.nextUniform() * 40);
    const bytes = new Uint8Array(length + 1);
    for (let i = 0; i < length; i++) bytes[i] = Math.floor(this.options.random.nextUniform() * 256);
    bytes[length] = LF;
    return bytes;
  }
}

export function encodeReply(reply: SimReply): Uint8Array {
  if (typeof reply === 'string') return encoder.encode(`${reply}\n`);
  const out = new Uint8Array(reply.length + 1);
  out.set(reply, 0);
  out[reply.length] = LF;
  return out;
}
