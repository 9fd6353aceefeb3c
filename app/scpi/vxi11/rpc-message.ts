/**
 * ONC RPC version 2 messages (RFC 5531 §9, recalled from memory): a call
 * names program, version and procedure; a reply is accepted (with an
 * accept_stat) or denied. Only AUTH_NONE (flavor 0) is sent; any credential
 * a caller sends is read and ignored, as the portmapper and VXI-11 ask for
 * no authentication.
 */
import { XdrReader, XdrWriter } from './xdr';

export const RPC_VERSION = 2;
const MSG_CALL = 0;
const MSG_REPLY = 1;
const MSG_ACCEPTED = 0;
const MSG_DENIED = 1;
const AUTH_NONE = 0;
/** RFC 5531 §8.2: an opaque_auth body is at most 400 bytes. */
const MAX_AUTH_BYTES = 400;

/** accept_stat (RFC 5531 §9). */
export const AcceptStat = {
  success: 0,
  programUnavailable: 1,
  programMismatch: 2,
  procedureUnavailable: 3,
  garbageArguments: 4,
  systemError: 5,
} as const;
export type AcceptStatCode = (typeof AcceptStat)[keyof typeof AcceptStat];

export interface RpcCall {
  xid: number;
  program: number;
  version: number;
  procedure: number;
  /** The procedure's arguments, still XDR-encoded. */
  args: Uint8Array;
}

export type RpcReply =
  | { xid: number; status: 'accepted'; acceptStat: AcceptStatCode; results: Uint8Array; versionLow?: number; versionHigh?: number }
  | { xid: number; status: 'denied'; detail: string };

export function encodeCall(call: RpcCall): Uint8Array {
  return new XdrWriter()
    .uint(call.xid)
    .uint(MSG_CALL)
    .uint(RPC_VERSION)
    .uint(call.program)
    .uint(call.version)
    .uint(call.procedure)
    .uint(AUTH_NONE)
    .opaque(new Uint8Array(0)) // credential
    .uint(AUTH_NONE)
    .opaque(new Uint8Array(0)) // verifier
    .raw(call.args)
    .finish();
}

/** Decodes a call; undefined for a record that is a reply or not RPC version 2 (the caller answers or drops it). */
export function decodeCall(record: Uint8Array): { call: RpcCall } | { rpcMismatch: number } | undefined {
  const reader = new XdrReader(record);
  const xid = reader.uint();
  if (reader.uint() !== MSG_CALL) return undefined;
  if (reader.uint() !== RPC_VERSION) return { rpcMismatch: xid };
  const program = reader.uint();
  const version = reader.uint();
  const procedure = reader.uint();
  reader.uint();
  reader.opaque(MAX_AUTH_BYTES);
  reader.uint();
  reader.opaque(MAX_AUTH_BYTES);
  return { call: { xid, program, version, procedure, args: reader.rest().slice() } };
}

export function encodeAcceptedReply(xid: number, acceptStat: AcceptStatCode, results: Uint8Array = new Uint8Array(0), supportedVersions?: { low: number; high: number }): Uint8Array {
  const writer = new XdrWriter().uint(xid).uint(MSG_REPLY).uint(MSG_ACCEPTED).uint(AUTH_NONE).opaque(new Uint8Array(0)).uint(acceptStat);
  if (acceptStat === AcceptStat.programMismatch) writer.uint(supportedVersions?.low ?? 0).uint(supportedVersions?.high ?? 0);
  return writer.raw(results).finish();
}

/** MSG_DENIED with RPC_MISMATCH: we speak RPC version 2 only. */
export function encodeRpcMismatchReply(xid: number): Uint8Array {
  return new XdrWriter().uint(xid).uint(MSG_REPLY).uint(MSG_DENIED).uint(0).uint(RPC_VERSION).uint(RPC_VERSION).finish();
}

export function decodeReply(record: Uint8Array): RpcReply | undefined {
  const reader = new XdrReader(record);
  const xid = reader.uint();
  if (reader.uint() !== MSG_REPLY) return undefined;
  if (reader.uint() === MSG_DENIED) {
    const rejectStat = reader.uint();
    const detail = rejectStat === 0 ? `RPC version mismatch (server speaks ${reader.uint()}–${reader.uint()})` : `authentication refused (auth_stat ${reader.uint()})`;
    return { xid, status: 'denied', detail };
  }
  reader.uint();
  reader.opaque(MAX_AUTH_BYTES);
  const acceptStat = reader.uint() as AcceptStatCode;
  if (acceptStat === AcceptStat.programMismatch) {
    return { xid, status: 'accepted', acceptStat, results: new Uint8Array(0), versionLow: reader.uint(), versionHigh: reader.uint() };
  }
  return { xid, status: 'accepted', acceptStat, results: reader.rest().slice() };
}
