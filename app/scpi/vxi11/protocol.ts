/**
 * VXI-11 (VXIbus Consortium, TCP/IP Instrument Protocol Specification VXI-11,
 * rev 1.0, 1995): the RPC programs, procedures, flags and error codes, and the
 * XDR form of each procedure's arguments and results (§B.6, the RPCL
 * definitions). Shared by the client (app/scpi/vxi11/vxi11-client.ts) and the
 * simulated bench's server (app/sim/vxi11-server.ts) so both read the same
 * wire format. Numbers and section references recalled from memory; they
 * agree with what Debian's python3-pyvisa-py and lxi-tools send (the tests
 * talk to both).
 */
import { XdrReader, XdrWriter } from './xdr';

/** §B.6: DEVICE_CORE, DEVICE_ASYNC (the abort channel), both version 1. */
export const DEVICE_CORE_PROGRAM = 0x0607af;
export const DEVICE_ASYNC_PROGRAM = 0x0607b0;
export const DEVICE_CORE_VERSION = 1;
export const DEVICE_ASYNC_VERSION = 1;

export const CoreProcedure = {
  createLink: 10,
  deviceWrite: 11,
  deviceRead: 12,
  deviceReadStb: 13,
  deviceTrigger: 14,
  deviceClear: 15,
  deviceRemote: 16,
  deviceLocal: 17,
  deviceLock: 18,
  deviceUnlock: 19,
  deviceEnableSrq: 20,
  deviceDocmd: 22,
  destroyLink: 23,
  createInterruptChannel: 25,
  destroyInterruptChannel: 26,
} as const;
export const ASYNC_DEVICE_ABORT = 1;

/** Device_Flags (§B.5.3): wait for a lock, this write ends the message, a read stops at termChar. */
export const Flag = { waitLock: 1, end: 8, termCharSet: 128 } as const;
/** device_read reasons (§B.6.4): the request count was reached, the term char was read, END was read. */
export const Reason = { requestCount: 1, termChar: 2, end: 4 } as const;

/** Device_ErrorCode (§B.5.2). */
export const Vxi11ErrorCode = {
  none: 0,
  syntax: 1,
  deviceNotAccessible: 3,
  invalidLinkId: 4,
  parameter: 5,
  channelNotEstablished: 6,
  operationNotSupported: 8,
  outOfResources: 9,
  deviceLockedByAnotherLink: 11,
  noLockHeldByThisLink: 12,
  ioTimeout: 15,
  ioError: 17,
  invalidAddress: 21,
  abort: 23,
  channelAlreadyEstablished: 29,
} as const;

export const VXI11_ERROR_TEXT: Record<number, string> = {
  0: 'no error',
  1: 'syntax error',
  3: 'device not accessible',
  4: 'invalid link identifier',
  5: 'parameter error',
  6: 'channel not established',
  8: 'operation not supported',
  9: 'out of resources',
  11: 'device locked by another link',
  12: 'no lock held by this link',
  15: 'I/O timeout',
  17: 'I/O error',
  21: 'invalid address',
  23: 'abort',
  29: 'channel already established',
};

export interface CreateLinkArgs {
  clientId: number;
  lockDevice: boolean;
  lockTimeoutMs: number;
  device: string;
}
export interface CreateLinkResult {
  error: number;
  linkId: number;
  abortPort: number;
  maxRecvSize: number;
}
export interface DeviceWriteArgs {
  linkId: number;
  ioTimeoutMs: number;
  lockTimeoutMs: number;
  flags: number;
  data: Uint8Array;
}
export interface DeviceReadArgs {
  linkId: number;
  requestSize: number;
  ioTimeoutMs: number;
  lockTimeoutMs: number;
  flags: number;
  termChar: number;
}
export interface DeviceReadResult {
  error: number;
  reason: number;
  data: Uint8Array;
}
/** Device_GenericParms: device_clear, _trigger, _remote, _local, _readstb. */
export interface GenericArgs {
  linkId: number;
  flags: number;
  lockTimeoutMs: number;
  ioTimeoutMs: number;
}
export interface LockArgs {
  linkId: number;
  flags: number;
  lockTimeoutMs: number;
}

/** A device name longer than this is refused (the specification sets no limit; common practice, no source). */
export const MAX_DEVICE_NAME_BYTES = 256;

export const encodeCreateLink = (a: CreateLinkArgs) => new XdrWriter().int(a.clientId).bool(a.lockDevice).uint(a.lockTimeoutMs).string(a.device).finish();
export const decodeCreateLink = (r: XdrReader): CreateLinkArgs => ({ clientId: r.int(), lockDevice: r.bool(), lockTimeoutMs: r.uint(), device: r.string(MAX_DEVICE_NAME_BYTES) });
export const encodeCreateLinkResult = (a: CreateLinkResult) => new XdrWriter().int(a.error).int(a.linkId).uint(a.abortPort).uint(a.maxRecvSize).finish();
export const decodeCreateLinkResult = (r: XdrReader): CreateLinkResult => ({ error: r.int(), linkId: r.int(), abortPort: r.uint(), maxRecvSize: r.uint() });

export const encodeDeviceWrite = (a: DeviceWriteArgs) => new XdrWriter().int(a.linkId).uint(a.ioTimeoutMs).uint(a.lockTimeoutMs).int(a.flags).opaque(a.data).finish();
export const decodeDeviceWrite = (r: XdrReader, maxBytes: number): DeviceWriteArgs => ({ linkId: r.int(), ioTimeoutMs: r.uint(), lockTimeoutMs: r.uint(), flags: r.int(), data: r.opaque(maxBytes) });
export const encodeDeviceWriteResult = (error: number, size: number) => new XdrWriter().int(error).uint(size).finish();
export const decodeDeviceWriteResult = (r: XdrReader) => ({ error: r.int(), size: r.uint() });

export const encodeDeviceRead = (a: DeviceReadArgs) => new XdrWriter().int(a.linkId).uint(a.requestSize).uint(a.ioTimeoutMs).uint(a.lockTimeoutMs).int(a.flags).int(a.termChar).finish();
export const decodeDeviceRead = (r: XdrReader): DeviceReadArgs => ({ linkId: r.int(), requestSize: r.uint(), ioTimeoutMs: r.uint(), lockTimeoutMs: r.uint(), flags: r.int(), termChar: r.int() & 0xff });
export const encodeDeviceReadResult = (a: DeviceReadResult) => new XdrWriter().int(a.error).int(a.reason).opaque(a.data).finish();
export const decodeDeviceReadResult = (r: XdrReader): DeviceReadResult => ({ error: r.int(), reason: r.int(), data: r.opaque() });

export const encodeGeneric = (a: GenericArgs) => new XdrWriter().int(a.linkId).int(a.flags).uint(a.lockTimeoutMs).uint(a.ioTimeoutMs).finish();
export const decodeGeneric = (r: XdrReader): GenericArgs => ({ linkId: r.int(), flags: r.int(), lockTimeoutMs: r.uint(), ioTimeoutMs: r.uint() });
export const encodeLock = (a: LockArgs) => new XdrWriter().int(a.linkId).int(a.flags).uint(a.lockTimeoutMs).finish();
export const decodeLock = (r: XdrReader): LockArgs => ({ linkId: r.int(), flags: r.int(), lockTimeoutMs: r.uint() });

/** Device_Error: the result of clear, trigger, remote, local, lock, unlock, destroy_link, abort. */
export const encodeDeviceError = (error: number) => new XdrWriter().int(error).finish();
export const decodeDeviceError = (r: XdrReader) => r.int();
/** Device_ReadStbResp: error and the status byte. */
export const encodeReadStbResult = (error: number, stb: number) => new XdrWriter().int(error).uint(stb & 0xff).finish();
export const decodeReadStbResult = (r: XdrReader) => ({ error: r.int(), stb: r.uint() & 0xff });
export const encodeLinkId = (linkId: number) => new XdrWriter().int(linkId).finish();
export const decodeLinkId = (r: XdrReader) => r.int();
