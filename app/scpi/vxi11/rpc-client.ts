/**
 * An ONC RPC client on one TCP connection (RFC 5531): calls carry a
 * transaction id (xid) and replies are matched by it, so calls may overlap.
 * Each call has its own time limit; the connection closing fails every call
 * in flight.
 */
import { Socket } from 'node:net';
import { AcceptStat, decodeReply, encodeCall } from './rpc-message';
import { RecordAssembler, encodeRecord } from './record-marking';
import { XdrReader } from './xdr';

/** The RPC connection closed, or could not be opened. */
export class RpcConnectionError extends Error {}
/** No reply to a call within its time limit. */
export class RpcTimeoutError extends Error {}
/** The server answered, but not with results: program, version or procedure unknown, arguments refused, or denied. */
export class RpcRejectedError extends Error {}

interface InFlight {
  resolve(results: XdrReader): void;
  reject(error: Error): void;
  timer: NodeJS.Timeout;
  what: string;
}

const ACCEPT_STAT_TEXT: Record<number, string> = {
  [AcceptStat.programUnavailable]: 'program not served',
  [AcceptStat.programMismatch]: 'program version not served',
  [AcceptStat.procedureUnavailable]: 'procedure not served',
  [AcceptStat.garbageArguments]: 'arguments not understood',
  [AcceptStat.systemError]: 'server system error',
};

export class RpcClient {
  private socket: Socket | undefined;
  private nextXid = Math.floor(Math.random() * 0x7fff_ffff);
  private readonly inFlight = new Map<number, InFlight>();
  private closedReason: string | undefined;
  private readonly closeListeners: Array<(reason: string) => void> = [];

  private constructor(readonly host: string, readonly port: number) {}

  static connect(host: string, port: number, timeoutMs: number): Promise<RpcClient> {
    const client = new RpcClient(host, port);
    return new Promise((resolve, reject) => {
      const socket = new Socket();
      socket.setNoDelay(true); // one small call per round trip; Nagle would delay each by a segment
      const timer = setTimeout(() => {
        socket.destroy();
        reject(new RpcConnectionError(`no connection to ${host}:${port} within ${timeoutMs / 1000} s`));
      }, timeoutMs);
      socket.once('error', (error) => {
        clearTimeout(timer);
        reject(new RpcConnectionError(error.message));
      });
      socket.connect(port, host, () => {
        clearTimeout(timer);
        socket.removeAllListeners('error');
        const assembler = new RecordAssembler((record) => client.received(record));
        socket.on('data', (chunk: Buffer) => {
          try {
            assembler.push(new Uint8Array(chunk.buffer, chunk.byteOffset, chunk.byteLength));
          } catch (error) {
            socket.destroy();
            client.closed(`unreadable RPC data (${(error as Error).message})`);
          }
        });
        socket.on('error', (error) => client.closed(error.message));
        socket.on('close', () => client.closed('connection closed'));
        client.socket = socket;
        resolve(client);
      });
    });
  }

  get isOpen(): boolean {
    return this.closedReason === undefined;
  }

  onClose(listener: (reason: string) => void): void {
    this.closeListeners.push(listener);
  }

  call(program: number, version: number, procedure: number, args: Uint8Array, timeoutMs: number, what = `procedure ${procedure}`): Promise<XdrReader> {
    if (this.closedReason !== undefined || !this.socket) return Promise.reject(new RpcConnectionError(this.closedReason ?? 'not connected'));
    const xid = this.nextXid;
    this.nextXid = (this.nextXid + 1) >>> 0;
    const socket = this.socket;
    return new Promise((resolve, reject) => {
      const timer = setTimeout(() => {
        this.inFlight.delete(xid);
        reject(new RpcTimeoutError(`no RPC reply to ${what} within ${timeoutMs / 1000} s`));
      }, timeoutMs);
      this.inFlight.set(xid, { resolve, reject, timer, what });
      socket.write(encodeRecord(encodeCall({ xid, program, version, procedure, args })));
    });
  }

  close(): void {
    this.socket?.destroy();
    this.closed('closed by the application');
  }

  private received(record: Uint8Array): void {
    let reply;
    try {
      reply = decodeReply(record);
    } catch {
      return; // a reply we cannot read names no call we can fail; its call times out
    }
    if (!reply) return;
    const call = this.inFlight.get(reply.xid);
    if (!call) return; // the reply to a call that already timed out
    this.inFlight.delete(reply.xid);
    clearTimeout(call.timer);
    if (reply.status === 'denied') return call.reject(new RpcRejectedError(`${call.what}: ${reply.detail}`));
    if (reply.acceptStat !== AcceptStat.success) return call.reject(new RpcRejectedError(`${call.what}: ${ACCEPT_STAT_TEXT[reply.acceptStat] ?? `accept_stat ${reply.acceptStat}`}`));
    call.resolve(new XdrReader(reply.results));
  }

  private closed(reason: string): void {
    if (this.closedReason !== undefined) return;
    this.closedReason = reason;
    for (const call of this.inFlight.values()) {
      clearTimeout(call.timer);
      call.reject(new RpcConnectionError(`${call.what}: ${reason}`));
    }
    this.inFlight.clear();
    for (const listener of this.closeListeners) listener(reason);
  }
}
