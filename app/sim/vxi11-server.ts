/**
 * The simulated bench's instruments as LAN instruments over VXI-11 (VXIbus
 * Consortium, TCP/IP Instrument Protocol Specification VXI-11, rev 1.0,
 * 1995; section numbers recalled from memory). One server, one core channel
 * and one abort channel, both on 127.0.0.1; each instrument is a device name:
 *
 *   inst0  generator      inst1  meter      inst2  scope
 *
 * so `TCPIP::127.0.0.1::INSTR` (inst0 by default) is the generator and
 * `TCPIP::127.0.0.1::inst2::INSTR` the scope. The core channel is registered
 * with the system portmapper (Debian's rpcbind) by PMAPPROC_SET over RPC on
 * 127.0.0.1:111 and unregistered (PMAPPROC_UNSET) on stop; only one process
 * can hold that registration at a time.
 *
 * A link feeds device_write data to the same InstrumentLink a socket feeds
 * (END terminates a program message as LF does, IEEE 488.2 §7.5), so
 * latency and faults behave alike on every transport. Each response message
 * is read back by device_read calls of at most the requested size, END on its
 * last byte, stopping early at the term char when the caller sets one.
 */
import { UserError } from '../errors';
import { SeededRandom } from '../numeric';
import { getPort, IPPROTO_TCP, portAnswers, setMapping, unsetMapping } from '../scpi/vxi11/portmapper';
import {
  ASYNC_DEVICE_ABORT,
  CoreProcedure,
  DEVICE_ASYNC_PROGRAM,
  DEVICE_ASYNC_VERSION,
  DEVICE_CORE_PROGRAM,
  DEVICE_CORE_VERSION,
  Flag,
  Reason,
  Vxi11ErrorCode,
  decodeCreateLink,
  decodeDeviceRead,
  decodeDeviceWrite,
  decodeGeneric,
  decodeLinkId,
  decodeLock,
  encodeCreateLinkResult,
  encodeDeviceError,
  encodeDeviceReadResult,
  encodeDeviceWriteResult,
  encodeReadStbResult,
  type DeviceReadResult,
} from '../scpi/vxi11/protocol';
import { startRpcServer, type RpcConnection, type RpcProcedure, type RpcServerHandle } from '../scpi/vxi11/rpc-server';
import { LOOPBACK_HOST } from './endpoints';
import { InstrumentLink, type LinkOptions } from './link-server';
import type { SimInstrument } from './sim-instrument';

export interface Vxi11Device {
  /** Device name clients give in create_link (inst0, inst1, …). */
  name: string;
  instrument: SimInstrument;
  linkOptions: LinkOptions;
}

export interface Vxi11ServerOptions {
  devices: Vxi11Device[];
  /** The core channel's TCP port (0: any free port). */
  port?: number;
  /** The largest device_write the server takes, bytes (create_link's maxRecvSize; default 64 KiB). */
  maxRecvSizeBytes?: number;
  /** Register with the portmapper on 127.0.0.1:111 (default true). */
  register?: boolean;
}

export interface Vxi11Server {
  corePort: number;
  abortPort: number;
  /** Drops every link to the named device (a pulled LAN cable, as the client sees it). */
  dropLinks(device: string): void;
  /** device_read calls served so far, per device name. */
  readonly readCalls: Map<string, number>;
  stop(): Promise<void>;
}

export const DEFAULT_MAX_RECV_SIZE_BYTES = 64 * 1024;
/** Portmapper calls are local and small; 5 s is generous (common practice, no source). */
const PORTMAPPER_TIMEOUT_MS = 5000;
const LF = 0x0a;

/** What a response message looks like while device_read calls take it out. */
class OutputQueue {
  private messages: Uint8Array[] = [];
  private offset = 0;
  private waiter: (() => void) | undefined;

  push(message: Uint8Array): void {
    this.messages.push(message);
    this.waiter?.();
  }

  isEmpty(): boolean {
    return this.messages.length === 0;
  }

  clear(): void {
    this.messages = [];
    this.offset = 0;
  }

  /** Waits up to timeoutMs for a response; the abort signal ends the wait early (device_abort). */
  async read(requestSize: number, termChar: number | undefined, timeoutMs: number, aborted: Promise<void>): Promise<DeviceReadResult> {
    if (this.messages.length === 0) {
      const outcome = await new Promise<'data' | 'timeout' | 'abort'>((resolve) => {
        const timer = setTimeout(() => resolve('timeout'), timeoutMs);
        this.waiter = () => {
          clearTimeout(timer);
          resolve('data');
        };
        void aborted.then(() => {
          clearTimeout(timer);
          resolve('abort');
        });
      });
      this.waiter = undefined;
      if (outcome === 'timeout') return { error: Vxi11ErrorCode.ioTimeout, reason: 0, data: new Uint8Array(0) };
      if (outcome === 'abort') return { error: Vxi11ErrorCode.abort, reason: 0, data: new Uint8Array(0) };
    }
    const message = this.messages[0];
    let end = Math.min(message.length, this.offset + Math.max(requestSize, 0));
    let reason = 0;
    if (termChar !== undefined) {
      const at = message.subarray(this.offset, end).indexOf(termChar);
      if (at >= 0) {
        end = this.offset + at + 1;
        reason |= Reason.termChar;
      }
    }
    const data = message.slice(this.offset, end);
    this.offset = end;
    if (end === message.length) {
      reason |= Reason.end;
      this.messages.shift();
      this.offset = 0;
    } else if (data.length === requestSize) {
      reason |= Reason.requestCount;
    }
    return { error: Vxi11ErrorCode.none, reason, data };
  }
}

interface ServerLink {
  id: number;
  device: DeviceState;
  connection: RpcConnection;
  output: OutputQueue;
  input: InstrumentLink;
  /** Resolves when device_abort arrives for this link; replaced after each abort. */
  aborted: Promise<void>;
  abort: () => void;
}

interface DeviceState extends Vxi11Device {
  lockHolder: number | undefined;
  lockReleased: Array<() => void>;
  links: Set<ServerLink>;
  readCalls: number;
}

export async function startVxi11Server(options: Vxi11ServerOptions): Promise<Vxi11Server> {
  const maxRecvSize = options.maxRecvSizeBytes ?? DEFAULT_MAX_RECV_SIZE_BYTES;
  const devices = new Map<string, DeviceState>(options.devices.map((d) => [d.name.toLowerCase(), { ...d, lockHolder: undefined, lockReleased: [], links: new Set(), readCalls: 0 }]));
  const links = new Map<number, ServerLink>();
  let nextLinkId = 1;

  const newInput = (link: Pick<ServerLink, 'device' | 'output'>) =>
    new InstrumentLink(link.device.instrument, { write: (bytes) => link.output.push(bytes.slice()) }, { ...link.device.linkOptions, random: new SeededRandom(link.device.linkOptions.random.nextUniform() * 2 ** 31) });
  const abortSignal = (link: ServerLink) => {
    link.aborted = new Promise<void>((resolve) => {
      link.abort = resolve;
    });
  };

  /** Waits for the device's lock to be free of other links (§B.5.3 waitlock), up to lockTimeoutMs. */
  const lockFree = async (link: ServerLink, flags: number, lockTimeoutMs: number): Promise<boolean> => {
    const device = link.device;
    if (device.lockHolder === undefined || device.lockHolder === link.id) return true;
    if ((flags & Flag.waitLock) === 0 || lockTimeoutMs === 0) return false;
    const deadline = Date.now() + lockTimeoutMs;
    while (device.lockHolder !== undefined && device.lockHolder !== link.id) {
      const left = deadline - Date.now();
      if (left <= 0) return false;
      await new Promise<void>((resolve) => {
        const timer = setTimeout(resolve, left);
        device.lockReleased.push(() => {
          clearTimeout(timer);
          resolve();
        });
      });
    }
    return true;
  };
  const releaseLock = (link: ServerLink) => {
    if (link.device.lockHolder !== link.id) return;
    link.device.lockHolder = undefined;
    const waiting = link.device.lockReleased.splice(0);
    for (const wake of waiting) wake();
  };
  const endLink = (link: ServerLink) => {
    releaseLock(link);
    link.input.close();
    link.abort();
    link.device.links.delete(link);
    links.delete(link.id);
  };

  /** The link named in a call, if it belongs to the connection the call came on (§B.4.2: a link lives on its channel). */
  const linkFor = (linkId: number, connection: RpcConnection) => {
    const link = links.get(linkId);
    return link && link.connection.id === connection.id ? link : undefined;
  };

  const core = new Map<number, RpcProcedure>([
    [
      CoreProcedure.createLink,
      async (args, connection) => {
        const request = decodeCreateLink(args);
        const device = devices.get(request.device.toLowerCase());
        // An unknown device name: error 3, device not accessible (§B.6.1, recalled from memory).
        if (!device) return encodeCreateLinkResult({ error: Vxi11ErrorCode.deviceNotAccessible, linkId: 0, abortPort: 0, maxRecvSize: 0 });
        const link = { id: nextLinkId++, device, connection, output: new OutputQueue() } as ServerLink;
        link.input = newInput(link);
        abortSignal(link);
        if (request.lockDevice) {
          if (!(await lockFree(link, Flag.waitLock, request.lockTimeoutMs))) {
            link.input.close();
            return encodeCreateLinkResult({ error: Vxi11ErrorCode.deviceLockedByAnotherLink, linkId: 0, abortPort: 0, maxRecvSize: 0 });
          }
          device.lockHolder = link.id;
        }
        links.set(link.id, link);
        device.links.add(link);
        connection.onClose(() => endLink(link));
        return encodeCreateLinkResult({ error: 0, linkId: link.id, abortPort: abortServer.port, maxRecvSize });
      },
    ],
    [
      CoreProcedure.deviceWrite,
      async (args, connection) => {
        const request = decodeDeviceWrite(args, maxRecvSize);
        const link = linkFor(request.linkId, connection);
        if (!link) return encodeDeviceWriteResult(Vxi11ErrorCode.invalidLinkId, 0);
        if (!(await lockFree(link, request.flags, request.lockTimeoutMs))) return encodeDeviceWriteResult(Vxi11ErrorCode.deviceLockedByAnotherLink, 0);
        link.input.receive(request.data);
        // END ends a program message as LF does (IEEE 488.2 §7.5 PROGRAM MESSAGE TERMINATOR, recalled).
        if ((request.flags & Flag.end) !== 0 && request.data[request.data.length - 1] !== LF) link.input.receive(Uint8Array.of(LF));
        return encodeDeviceWriteResult(0, request.data.length);
      },
    ],
    [
      CoreProcedure.deviceRead,
      async (args, connection) => {
        const request = decodeDeviceRead(args);
        const link = linkFor(request.linkId, connection);
        if (!link) return encodeDeviceReadResult({ error: Vxi11ErrorCode.invalidLinkId, reason: 0, data: new Uint8Array(0) });
        if (!(await lockFree(link, request.flags, request.lockTimeoutMs))) return encodeDeviceReadResult({ error: Vxi11ErrorCode.deviceLockedByAnotherLink, reason: 0, data: new Uint8Array(0) });
        link.device.readCalls++;
        const termChar = (request.flags & Flag.termCharSet) !== 0 ? request.termChar : undefined;
        const result = await link.output.read(request.requestSize, termChar, request.ioTimeoutMs, link.aborted);
        if (result.error === Vxi11ErrorCode.abort) abortSignal(link);
        return encodeDeviceReadResult(result);
      },
    ],
    [
      CoreProcedure.deviceReadStb,
      (args, connection) => {
        const request = decodeGeneric(args);
        const link = linkFor(request.linkId, connection);
        if (!link) return encodeReadStbResult(Vxi11ErrorCode.invalidLinkId, 0);
        // The status byte's MAV bit (IEEE 488.2 §11.2, bit 4, recalled): a response is waiting.
        return encodeReadStbResult(0, link.output.isEmpty() ? 0 : 0x10);
      },
    ],
    [
      CoreProcedure.deviceClear,
      async (args, connection) => {
        const request = decodeGeneric(args);
        const link = linkFor(request.linkId, connection);
        if (!link) return encodeDeviceError(Vxi11ErrorCode.invalidLinkId);
        if (!(await lockFree(link, request.flags, request.lockTimeoutMs))) return encodeDeviceError(Vxi11ErrorCode.deviceLockedByAnotherLink);
        // Device clear empties the input and output buffers, not the status or error queue (IEEE 488.2 §5.8, recalled).
        link.input.close();
        link.output.clear();
        link.input = newInput(link);
        return encodeDeviceError(0);
      },
    ],
    [CoreProcedure.deviceTrigger, (args, connection) => encodeDeviceError(linkFor(decodeGeneric(args).linkId, connection) ? Vxi11ErrorCode.operationNotSupported : Vxi11ErrorCode.invalidLinkId)],
    [CoreProcedure.deviceRemote, (args, connection) => encodeDeviceError(linkFor(decodeGeneric(args).linkId, connection) ? 0 : Vxi11ErrorCode.invalidLinkId)],
    [CoreProcedure.deviceLocal, (args, connection) => encodeDeviceError(linkFor(decodeGeneric(args).linkId, connection) ? 0 : Vxi11ErrorCode.invalidLinkId)],
    [
      CoreProcedure.deviceLock,
      async (args, connection) => {
        const request = decodeLock(args);
        const link = linkFor(request.linkId, connection);
        if (!link) return encodeDeviceError(Vxi11ErrorCode.invalidLinkId);
        if (!(await lockFree(link, request.flags, request.lockTimeoutMs))) return encodeDeviceError(Vxi11ErrorCode.deviceLockedByAnotherLink);
        link.device.lockHolder = link.id;
        return encodeDeviceError(0);
      },
    ],
    [
      CoreProcedure.deviceUnlock,
      (args, connection) => {
        const link = linkFor(decodeLinkId(args), connection);
        if (!link) return encodeDeviceError(Vxi11ErrorCode.invalidLinkId);
        if (link.device.lockHolder !== link.id) return encodeDeviceError(Vxi11ErrorCode.noLockHeldByThisLink);
        releaseLock(link);
        return encodeDeviceError(0);
      },
    ],
    [CoreProcedure.deviceEnableSrq, (args, connection) => encodeDeviceError(linkFor(decodeLinkId(args), connection) ? Vxi11ErrorCode.operationNotSupported : Vxi11ErrorCode.invalidLinkId)],
    [CoreProcedure.deviceDocmd, (args, connection) => encodeDeviceError(linkFor(decodeLinkId(args), connection) ? Vxi11ErrorCode.operationNotSupported : Vxi11ErrorCode.invalidLinkId)],
    [
      CoreProcedure.destroyLink,
      (args, connection) => {
        const link = linkFor(decodeLinkId(args), connection);
        if (!link) return encodeDeviceError(Vxi11ErrorCode.invalidLinkId);
        endLink(link);
        return encodeDeviceError(0);
      },
    ],
    // No interrupt channel: service requests are not simulated (§B.6.13, "operation not supported").
    [CoreProcedure.createInterruptChannel, () => encodeDeviceError(Vxi11ErrorCode.operationNotSupported)],
    [CoreProcedure.destroyInterruptChannel, () => encodeDeviceError(Vxi11ErrorCode.channelNotEstablished)],
  ]);

  const abortProcedures = new Map<number, RpcProcedure>([
    [
      ASYNC_DEVICE_ABORT,
      (args) => {
        // The abort channel is a connection of its own (§B.4.3): it names the link by id alone.
        const link = links.get(decodeLinkId(args));
        if (!link) return encodeDeviceError(Vxi11ErrorCode.invalidLinkId);
        link.abort();
        return encodeDeviceError(0);
      },
    ],
  ]);

  const abortServer: RpcServerHandle = await startRpcServer([{ program: DEVICE_ASYNC_PROGRAM, version: DEVICE_ASYNC_VERSION, procedures: abortProcedures }], LOOPBACK_HOST);
  let coreServer: RpcServerHandle;
  try {
    coreServer = await startRpcServer([{ program: DEVICE_CORE_PROGRAM, version: DEVICE_CORE_VERSION, procedures: core }], LOOPBACK_HOST, options.port ?? 0);
  } catch (error) {
    await abortServer.stop();
    throw error;
  }
  const register = options.register ?? true;
  if (register) {
    try {
      await registerCorePort(coreServer.port);
    } catch (error) {
      await coreServer.stop();
      await abortServer.stop();
      throw error;
    }
  }

  let stopped = false;
  return {
    corePort: coreServer.port,
    abortPort: abortServer.port,
    dropLinks: (name) => {
      const device = devices.get(name.toLowerCase());
      for (const link of device?.links ?? []) link.connection.destroy();
    },
    get readCalls() {
      return new Map([...devices.values()].map((d) => [d.name, d.readCalls]));
    },
    stop: async () => {
      if (stopped) return;
      stopped = true;
      for (const link of [...links.values()]) endLink(link);
      if (register) await unregisterCorePort(coreServer.port).catch(() => undefined);
      await coreServer.stop();
      await abortServer.stop();
    },
  };
}

/**
 * The VXI-11 server could not register with the portmapper (none answers, or
 * another VXI-11 server holds the registration): a matter of the machine's
 * set-up, so the CLI prints the message and hint, not a stack trace.
 */
export class Vxi11RegistrationError extends UserError {}

/**
 * PMAPPROC_SET for the core channel. A registration left by a process that
 * died (its port no longer answers) is removed and ours made; a live one is
 * not taken over.
 */
async function registerCorePort(port: number): Promise<void> {
  const mapping = { program: DEVICE_CORE_PROGRAM, version: DEVICE_CORE_VERSION, protocol: IPPROTO_TCP, port };
  let registered: boolean;
  try {
    registered = await setMapping(LOOPBACK_HOST, mapping, PORTMAPPER_TIMEOUT_MS);
  } catch (error) {
    throw new Vxi11RegistrationError(
      `cannot reach the portmapper on ${LOOPBACK_HOST}:111 (${(error as Error).message}); VXI-11 clients find instruments through it`,
      'Start it (Debian: apt-get install rpcbind; then rpcbind -w, or systemctl start rpcbind), or leave out --vxi11 and use the raw socket addresses.',
    );
  }
  if (registered) return;
  const holder = await getPort(LOOPBACK_HOST, DEVICE_CORE_PROGRAM, DEVICE_CORE_VERSION, PORTMAPPER_TIMEOUT_MS);
  if (holder !== 0 && (await portAnswers(LOOPBACK_HOST, holder, 1000))) {
    throw new Vxi11RegistrationError(
      `another VXI-11 server is registered with the portmapper (port ${holder}); only one can be`,
      `Stop it, or remove a stale entry with: rpcinfo -d ${DEVICE_CORE_PROGRAM} ${DEVICE_CORE_VERSION}`,
    );
  }
  await unsetMapping(LOOPBACK_HOST, DEVICE_CORE_PROGRAM, DEVICE_CORE_VERSION, PORTMAPPER_TIMEOUT_MS);
  if (!(await setMapping(LOOPBACK_HOST, mapping, PORTMAPPER_TIMEOUT_MS))) throw new Vxi11RegistrationError('the portmapper refused the VXI-11 registration after the stale entry was removed', `Check the portmapper with: rpcinfo -p ${LOOPBACK_HOST}`);
}

/** Removes our registration only: an entry another process made since stays. */
async function unregisterCorePort(port: number): Promise<void> {
  const holder = await getPort(LOOPBACK_HOST, DEVICE_CORE_PROGRAM, DEVICE_CORE_VERSION, PORTMAPPER_TIMEOUT_MS);
  if (holder === port) await unsetMapping(LOOPBACK_HOST, DEVICE_CORE_PROGRAM, DEVICE_CORE_VERSION, PORTMAPPER_TIMEOUT_MS);
}
