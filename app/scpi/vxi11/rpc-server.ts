/**
 * An ONC RPC server on TCP (RFC 5531), loopback only. Calls on one
 * connection are answered in order, one at a time (what the VXI-11 core
 * channel asks of a link); separate connections proceed independently.
 * Unknown programs, versions and procedures get the accept_stat RFC 5531 §9
 * names for them, undecodable arguments GARBAGE_ARGS, and the connection
 * stays up.
 */
import { createServer, type Server, type Socket } from 'node:net';
import { AcceptStat, decodeCall, encodeAcceptedReply, encodeRpcMismatchReply, type RpcCall } from './rpc-message';
import { RecordAssembler, encodeRecord } from './record-marking';
import { XdrDecodeError, XdrReader } from './xdr';

export interface RpcConnection {
  readonly id: number;
  /** Ends the connection at once (a dropped link). */
  destroy(): void;
  onClose(listener: () => void): void;
}

export type RpcProcedure = (args: XdrReader, connection: RpcConnection) => Uint8Array | Promise<Uint8Array>;

export interface RpcProgram {
  program: number;
  version: number;
  procedures: Map<number, RpcProcedure>;
}

export interface RpcServerHandle {
  port: number;
  /** Every open connection, for dropping links. */
  connections(): RpcConnection[];
  stop(): Promise<void>;
}

/** NULLPROC (procedure 0) answers every program: RFC 5531 §12.1 (a ping; recalled from memory). */
const NULL_PROCEDURE = 0;

export async function startRpcServer(programs: RpcProgram[], host: string, port = 0): Promise<RpcServerHandle> {
  const open = new Map<number, { connection: RpcConnection; socket: Socket }>();
  let nextId = 1;
  const server: Server = createServer((socket) => {
    socket.setNoDelay(true);
    const closeListeners: Array<() => void> = [];
    const connection: RpcConnection = {
      id: nextId++,
      destroy: () => socket.resetAndDestroy(),
      onClose: (listener) => closeListeners.push(listener),
    };
    open.set(connection.id, { connection, socket });
    let chain: Promise<void> = Promise.resolve();
    const assembler = new RecordAssembler((record) => {
      chain = chain.then(async () => {
        const reply = await answer(programs, record, connection);
        if (reply && !socket.destroyed) socket.write(encodeRecord(reply));
      });
    });
    socket.on('data', (chunk: Buffer) => {
      try {
        assembler.push(new Uint8Array(chunk.buffer, chunk.byteOffset, chunk.byteLength));
      } catch {
        socket.destroy(); // a record too large to be ours: not an RPC peer
      }
    });
    socket.on('error', () => undefined);
    socket.on('close', () => {
      open.delete(connection.id);
      for (const listener of closeListeners) listener();
    });
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => resolve());
  });
  return {
    port: (server.address() as { port: number }).port,
    connections: () => [...open.values()].map((entry) => entry.connection),
    stop: async () => {
      for (const { socket } of open.values()) socket.destroy();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}

async function answer(programs: RpcProgram[], record: Uint8Array, connection: RpcConnection): Promise<Uint8Array | undefined> {
  let decoded;
  try {
    decoded = decodeCall(record);
  } catch {
    return undefined; // not even a call header: nothing to answer to
  }
  if (!decoded) return undefined;
  if ('rpcMismatch' in decoded) return encodeRpcMismatchReply(decoded.rpcMismatch);
  const call: RpcCall = decoded.call;
  const versions = programs.filter((p) => p.program === call.program);
  if (versions.length === 0) return encodeAcceptedReply(call.xid, AcceptStat.programUnavailable);
  const program = versions.find((p) => p.version === call.version);
  if (!program) {
    const served = versions.map((p) => p.version);
    return encodeAcceptedReply(call.xid, AcceptStat.programMismatch, undefined, { low: Math.min(...served), high: Math.max(...served) });
  }
  if (call.procedure === NULL_PROCEDURE) return encodeAcceptedReply(call.xid, AcceptStat.success);
  const procedure = program.procedures.get(call.procedure);
  if (!procedure) return encodeAcceptedReply(call.xid, AcceptStat.procedureUnavailable);
  try {
    return encodeAcceptedReply(call.xid, AcceptStat.success, await procedure(new XdrReader(call.args), connection));
  } catch (error) {
    return encodeAcceptedReply(call.xid, error instanceof XdrDecodeError ? AcceptStat.garbageArguments : AcceptStat.systemError);
  }
}
