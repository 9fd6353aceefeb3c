/**
 * Serves one simulated instrument over one byte link (a TCP socket or the
 * instrument end of a PTY pair): splits incoming bytes into program messages
 * at LF (CR LF accepted), executes them in order, writes each response
 * message with an LF terminator, and applies link latency and faults.
 */
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
const CR = 0x0d;
/** A program message longer than this without LF is noise; it is dropped. */
const MAX_MESSAGE_BYTES = 64 * 1024;
const encoder = new TextEncoder();
const latin1 = new TextDecoder('latin1');

export class InstrumentLink {
  private pending = new Uint8Array(0);
  private chain: Promise<void> = Promise.resolve();
  private closed = false;

  constructor(
    private readonly instrument: SimInstrument,
    private readonly link: ByteLink,
    private readonly options: LinkOptions,
  ) {}

  receive(bytes: Uint8Array): void {
    const joined = new Uint8Array(this.pending.length + bytes.length);
    joined.set(this.pending, 0);
    joined.set(bytes, this.pending.length);
    let start = 0;
    for (let i = 0; i < joined.length; i++) {
      if (joined[i] !== LF) continue;
      const end = i > start && joined[i - 1] === CR ? i - 1 : i;
      const message = latin1.decode(joined.subarray(start, end));
      start = i + 1;
      this.chain = this.chain.then(() => this.handle(message));
    }
    this.pending = joined.slice(start);
    if (this.pending.length > MAX_MESSAGE_BYTES) this.pending = new Uint8Array(0);
  }

  close(): void {
    this.closed = true;
  }

  private async handle(message: string): Promise<void> {
    if (this.closed || message.trim() === '') return;
    await this.options.faults.whileHung();
    if (this.closed) return;
    let reply: SimReply | undefined;
    try {
      reply = await this.instrument.execute(message);
    } catch {
      return; // execute() queues its own errors; anything else must not stop the link
    }
    if (reply === undefined || this.closed) return;
    const fault = this.options.faults.current;
    let delayS = this.options.latencyS;
    if (fault?.kind === 'slow') delayS += fault.delayS;
    // The clock's sleep never ends early (a bare timer can fire ~1 ms before its delay): a reply is
    // never faster than the latency asked for.
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
