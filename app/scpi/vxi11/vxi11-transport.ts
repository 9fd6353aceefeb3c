/**
 * VXI-11 behind the byte-pipe Transport: a program message goes out as
 * device_write calls of at most maxRecvSize bytes, END on the last; when the
 * message holds a query, device_read calls follow until the reply's END (or
 * term char) and each call's bytes are handed on as they come, so the
 * session frames text and definite-length blocks exactly as on a socket. No
 * term char is set: a block may hold any byte, and END marks the message's
 * end. A reply that ends in END without LF gets an LF, the byte-stream
 * terminator the session's framer expects (IEEE 488.2 §8.5: the response
 * terminator is NL^END; recalled from memory).
 */
import { ScpiDisconnectedError, ScpiError, ScpiLinkError, ScpiTimeoutError } from '../errors';
import { OperationQueue } from '../operation-queue';
import { TransportListeners, type Transport, type WriteOptions } from '../transport';
import { Reason } from './protocol';
import { RpcConnectionError, RpcTimeoutError } from './rpc-client';
import { Vxi11Link, type Vxi11LinkSettings } from './vxi11-client';

export interface Vxi11Settings extends Vxi11LinkSettings {
  /** requestSize of each device_read, bytes (default 1 MiB; the server may return less). */
  readChunkBytes?: number;
  /** Time limit of a write, and of a read when the command gives none, seconds. */
  ioTimeoutS?: number;
}

const DEFAULT_READ_CHUNK_BYTES = 1 << 20;
const LF = 0x0a;

export class Vxi11Transport extends TransportListeners implements Transport {
  readonly description: string;
  private link: Vxi11Link | undefined;
  /** Operations on the link run one after another, as on the instrument (§B.4: one operation per link at a time). */
  private readonly operations = new OperationQueue();
  /** device_read calls made so far (the benchmark and tests count them). */
  deviceReadCalls = 0;
  /**
   * A response read failed (a timeout, an abort): the instrument may still
   * hold that response, or deliver it later, and the next device_read would
   * take it for the next query's. The next message is preceded by
   * device_clear, which empties the instrument's buffers.
   */
  private clearBeforeNextMessage = false;

  constructor(private readonly settings: Vxi11Settings) {
    super();
    const host = settings.host.includes(':') ? `[${settings.host}]` : settings.host;
    this.description = `vxi-11 ${host} ${settings.device}`;
  }

  get isOpen(): boolean {
    return this.link !== undefined && this.link.isOpen && !this.closeReported;
  }

  /** create_link's maxRecvSize, once open. */
  get maxRecvSize(): number | undefined {
    return this.link?.maxRecvSize;
  }

  async open(): Promise<void> {
    const link = await Vxi11Link.open(this.settings, this.description);
    link.onClose((reason) => this.reportClose(reason));
    this.link = link;
  }

  write(bytes: Uint8Array, options: WriteOptions = {}): Promise<void> {
    const link = this.link;
    if (!link || !this.isOpen) return Promise.reject(new Error('connection is not open'));
    const command = describeCommand(bytes);
    const written = this.operations.run(() => this.writeMessage(link, bytes, command));
    if (options.replyExpected) {
      const timeoutS = options.timeoutS ?? this.settings.ioTimeoutS ?? 5;
      // No read after a failed write: the instrument has no query to answer, and the write's own error reaches the session.
      this.operations.run(async () => {
        if (!(await written.then(() => true, () => false))) return;
        try {
          await this.readMessage(link, timeoutS, command);
        } catch (error) {
          this.clearBeforeNextMessage = true;
          throw error;
        }
      }).catch((error: Error) => options.onReplyFailure?.(this.named(error, command)));
    }
    return written.catch((error: Error) => {
      throw this.named(error, command);
    });
  }

  /** device_clear: the instrument drops input it has not executed and output not yet read. */
  clear(timeoutS = 5): Promise<void> {
    const link = this.requireLink();
    return this.operations.run(() => link.clear(timeoutS));
  }

  readStatusByte(timeoutS = 5): Promise<number> {
    const link = this.requireLink();
    return this.operations.run(() => link.readStatusByte(timeoutS));
  }

  lock(lockTimeoutS?: number): Promise<void> {
    const link = this.requireLink();
    return this.operations.run(() => link.lock(lockTimeoutS));
  }

  unlock(): Promise<void> {
    const link = this.requireLink();
    return this.operations.run(() => link.unlock());
  }

  async close(): Promise<void> {
    const link = this.link;
    if (!link) return;
    await link.destroy();
    this.reportClose('closed by the application');
  }

  private async writeMessage(link: Vxi11Link, bytes: Uint8Array, command: string): Promise<void> {
    const ioTimeoutS = this.settings.ioTimeoutS ?? 5;
    if (this.clearBeforeNextMessage) {
      await link.clear(ioTimeoutS);
      this.clearBeforeNextMessage = false;
    }
    let at = 0;
    do {
      const chunk = bytes.subarray(at, Math.min(bytes.length, at + link.maxRecvSize));
      const last = at + chunk.length >= bytes.length;
      const accepted = await link.write(chunk, last, ioTimeoutS, command);
      // A device may take fewer bytes than offered (§B.6.2); the rest goes in the next call.
      at += Math.min(accepted, chunk.length);
      if (accepted === 0 && chunk.length > 0) throw new Error(`device_write for "${command}" accepted no bytes`);
    } while (at < bytes.length);
  }

  private async readMessage(link: Vxi11Link, timeoutS: number, command: string): Promise<void> {
    const requestSize = this.settings.readChunkBytes ?? DEFAULT_READ_CHUNK_BYTES;
    let last = -1;
    for (;;) {
      this.deviceReadCalls++;
      const result = await link.read(requestSize, timeoutS, command);
      if (result.data.length > 0) {
        last = result.data[result.data.length - 1];
        this.emitData(result.data);
      }
      if ((result.reason & (Reason.end | Reason.termChar)) !== 0) break;
      // Neither data nor an end: a server that would keep us asking forever.
      if (result.data.length === 0) throw new ScpiLinkError(this.description, 'VXI-11', 0, `device_read returned no data and no END (reason ${result.reason})`, `device_read for "${command}"`);
    }
    if (last !== LF) this.emitData(Uint8Array.of(LF));
  }


  private requireLink(): Vxi11Link {
    if (!this.link || !this.isOpen) throw new ScpiDisconnectedError(this.description, 'connection is not open');
    return this.link;
  }

  /** RPC-level failures in the session's terms; VXI-11 error codes are already named by the link. */
  private named(error: Error, command: string): Error {
    if (error instanceof ScpiError) return error;
    if (error instanceof RpcConnectionError) return new ScpiDisconnectedError(this.description, error.message, command);
    if (error instanceof RpcTimeoutError) return new ScpiTimeoutError(command, this.settings.ioTimeoutS ?? 5, this.description);
    return error;
  }
}

/** The command as the error messages name it: the first line, without its terminator. */
function describeCommand(bytes: Uint8Array): string {
  const end = bytes.indexOf(LF);
  const text = new TextDecoder('latin1').decode(bytes.subarray(0, end < 0 ? Math.min(bytes.length, 200) : Math.min(end, 200)));
  return text.replace(/\r$/, '');
}
