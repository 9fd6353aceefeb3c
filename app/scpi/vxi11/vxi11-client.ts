/**
 * One VXI-11 link to one device (VXI-11 §B.4, recalled from memory): the
 * portmapper gives the core channel's TCP port, create_link opens the link to
 * a device name (inst0, inst1, …) and tells the largest write the device
 * takes (maxRecvSize) and the abort channel's port. Every core procedure
 * answers with a Device_ErrorCode; non-zero codes become the session's
 * named errors (vxi11-errors.ts).
 */
import { getPort } from './portmapper';
import {
  ASYNC_DEVICE_ABORT,
  CoreProcedure,
  DEVICE_ASYNC_PROGRAM,
  DEVICE_ASYNC_VERSION,
  DEVICE_CORE_PROGRAM,
  DEVICE_CORE_VERSION,
  Flag,
  decodeCreateLinkResult,
  decodeDeviceError,
  decodeDeviceReadResult,
  decodeDeviceWriteResult,
  decodeReadStbResult,
  encodeCreateLink,
  encodeDeviceRead,
  encodeDeviceWrite,
  encodeGeneric,
  encodeLinkId,
  encodeLock,
  type DeviceReadResult,
} from './protocol';
import { RpcClient } from './rpc-client';
import { vxi11Failure } from './vxi11-errors';
import type { XdrReader } from './xdr';

export interface Vxi11LinkSettings {
  host: string;
  /** Device name on the instrument: inst0 unless the address names another. */
  device: string;
  connectTimeoutS?: number;
  /** How long an operation waits for another link's lock before VXI-11 error 11; 0: fail at once. */
  lockTimeoutS?: number;
  /** The core channel's port, when known; otherwise the portmapper is asked. */
  corePort?: number;
}

/** Margin on top of an operation's own I/O time limit before the RPC call itself is given up (common practice, no source). */
const RPC_MARGIN_MS = 2000;

export class Vxi11Link {
  /** Largest device_write data the device accepts (create_link's maxRecvSize). */
  readonly maxRecvSize: number;
  private destroyed = false;

  private constructor(
    readonly description: string,
    private readonly rpc: RpcClient,
    private readonly linkId: number,
    maxRecvSize: number,
    private readonly abortPort: number,
    private readonly host: string,
    readonly lockTimeoutS: number,
  ) {
    // §B.6.1: a device advertises at least 1024 bytes; guard a server that says 0.
    this.maxRecvSize = maxRecvSize > 0 ? maxRecvSize : 1024;
  }

  static async open(settings: Vxi11LinkSettings, description: string): Promise<Vxi11Link> {
    const timeoutMs = (settings.connectTimeoutS ?? 5) * 1000;
    const lockTimeoutS = settings.lockTimeoutS ?? 0;
    const port = settings.corePort ?? (await getPort(settings.host, DEVICE_CORE_PROGRAM, DEVICE_CORE_VERSION, timeoutMs));
    if (port === 0) throw new Error(`no VXI-11 server is registered with the portmapper on ${settings.host} (program 0x0607AF version 1 has no port)`);
    const rpc = await RpcClient.connect(settings.host, port, timeoutMs);
    try {
      const args = encodeCreateLink({ clientId: process.pid & 0x7fff_ffff, lockDevice: false, lockTimeoutMs: lockTimeoutS * 1000, device: settings.device });
      const result = decodeCreateLinkResult(await rpc.call(DEVICE_CORE_PROGRAM, DEVICE_CORE_VERSION, CoreProcedure.createLink, args, timeoutMs, 'create_link'));
      if (result.error !== 0) throw vxi11Failure(result.error, { link: description, operation: `create_link to "${settings.device}"`, ioTimeoutS: timeoutMs / 1000, lockTimeoutS });
      return new Vxi11Link(description, rpc, result.linkId, result.maxRecvSize, result.abortPort, settings.host, lockTimeoutS);
    } catch (error) {
      rpc.close();
      throw error;
    }
  }

  get isOpen(): boolean {
    return this.rpc.isOpen && !this.destroyed;
  }

  onClose(listener: (reason: string) => void): void {
    this.rpc.onClose(listener);
  }

  /** device_write of one chunk (at most maxRecvSize bytes); `end` marks the message's last byte (END). */
  async write(data: Uint8Array, end: boolean, ioTimeoutS: number, command?: string): Promise<number> {
    const args = encodeDeviceWrite({ linkId: this.linkId, ioTimeoutMs: toMs(ioTimeoutS), lockTimeoutMs: toMs(this.lockTimeoutS), flags: this.lockFlag() | (end ? Flag.end : 0), data });
    const result = decodeDeviceWriteResult(await this.call(CoreProcedure.deviceWrite, args, ioTimeoutS, 'device_write', command));
    this.check(result.error, 'device_write', ioTimeoutS, command);
    return result.size;
  }

  /**
   * One device_read of at most requestSize bytes. The reason bits say why it
   * stopped: request count, term char (only when one is given), or END.
   */
  async read(requestSize: number, ioTimeoutS: number, command?: string, termChar?: number): Promise<DeviceReadResult> {
    const flags = this.lockFlag() | (termChar === undefined ? 0 : Flag.termCharSet);
    const args = encodeDeviceRead({ linkId: this.linkId, requestSize, ioTimeoutMs: toMs(ioTimeoutS), lockTimeoutMs: toMs(this.lockTimeoutS), flags, termChar: termChar ?? 0 });
    const result = decodeDeviceReadResult(await this.call(CoreProcedure.deviceRead, args, ioTimeoutS, 'device_read', command));
    this.check(result.error, 'device_read', ioTimeoutS, command);
    return result;
  }

  /** device_clear: the device empties its input and output buffers (IEEE 488.1 device clear over the network). */
  async clear(ioTimeoutS = 5): Promise<void> {
    await this.generic(CoreProcedure.deviceClear, 'device_clear', ioTimeoutS);
  }

  async readStatusByte(ioTimeoutS = 5): Promise<number> {
    const args = encodeGeneric({ linkId: this.linkId, flags: this.lockFlag(), lockTimeoutMs: toMs(this.lockTimeoutS), ioTimeoutMs: toMs(ioTimeoutS) });
    const result = decodeReadStbResult(await this.call(CoreProcedure.deviceReadStb, args, ioTimeoutS, 'device_readstb'));
    this.check(result.error, 'device_readstb', ioTimeoutS);
    return result.stb;
  }

  /** device_lock: waits up to lockTimeoutS for another link's lock, then VXI-11 error 11. */
  async lock(lockTimeoutS = this.lockTimeoutS): Promise<void> {
    const args = encodeLock({ linkId: this.linkId, flags: lockTimeoutS > 0 ? Flag.waitLock : 0, lockTimeoutMs: toMs(lockTimeoutS) });
    const error = decodeDeviceError(await this.call(CoreProcedure.deviceLock, args, lockTimeoutS, 'device_lock'));
    if (error !== 0) throw vxi11Failure(error, { link: this.description, operation: 'device_lock', ioTimeoutS: lockTimeoutS, lockTimeoutS });
  }

  async unlock(): Promise<void> {
    const error = decodeDeviceError(await this.call(CoreProcedure.deviceUnlock, encodeLinkId(this.linkId), 0, 'device_unlock'));
    this.check(error, 'device_unlock', 0);
  }

  /** device_abort on the abort channel (§B.4.3): ends this link's operation in progress with error 23. */
  async abort(timeoutS = 5): Promise<void> {
    const rpc = await RpcClient.connect(this.host, this.abortPort, timeoutS * 1000);
    try {
      const error = decodeDeviceError(await rpc.call(DEVICE_ASYNC_PROGRAM, DEVICE_ASYNC_VERSION, ASYNC_DEVICE_ABORT, encodeLinkId(this.linkId), timeoutS * 1000, 'device_abort'));
      this.check(error, 'device_abort', timeoutS);
    } finally {
      rpc.close();
    }
  }

  /** destroy_link, then the connection closes. A link already lost is simply closed. */
  async destroy(timeoutS = 2): Promise<void> {
    if (this.destroyed) return;
    this.destroyed = true;
    try {
      if (this.rpc.isOpen) await this.rpc.call(DEVICE_CORE_PROGRAM, DEVICE_CORE_VERSION, CoreProcedure.destroyLink, encodeLinkId(this.linkId), timeoutS * 1000, 'destroy_link');
    } catch {
      // the server is gone or slow: closing the connection ends the link on its side too (§B.4.2)
    } finally {
      this.rpc.close();
    }
  }

  private async generic(procedure: number, operation: string, ioTimeoutS: number): Promise<void> {
    const args = encodeGeneric({ linkId: this.linkId, flags: this.lockFlag(), lockTimeoutMs: toMs(this.lockTimeoutS), ioTimeoutMs: toMs(ioTimeoutS) });
    this.check(decodeDeviceError(await this.call(procedure, args, ioTimeoutS, operation)), operation, ioTimeoutS);
  }

  private call(procedure: number, args: Uint8Array, ioTimeoutS: number, operation: string, command?: string): Promise<XdrReader> {
    // The server gives up at ioTimeoutS (+ lock wait) and answers error 15; the RPC call waits a margin longer for that answer.
    const limitMs = toMs(ioTimeoutS) + toMs(this.lockTimeoutS) + RPC_MARGIN_MS;
    return this.rpc.call(DEVICE_CORE_PROGRAM, DEVICE_CORE_VERSION, procedure, args, limitMs, command ? `${operation} for "${command}"` : operation);
  }

  private check(error: number, operation: string, ioTimeoutS: number, command?: string): void {
    if (error !== 0) throw vxi11Failure(error, { link: this.description, operation, command, ioTimeoutS, lockTimeoutS: this.lockTimeoutS });
  }

  private lockFlag(): number {
    return this.lockTimeoutS > 0 ? Flag.waitLock : 0;
  }
}

function toMs(seconds: number): number {
  return Math.max(0, Math.round(seconds * 1000));
}

