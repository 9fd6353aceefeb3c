/**
 * USBTMC through the Linux kernel's usbtmc driver: the resource string's
 * vendor, product and serial number are found in sysfs (../ports/usbtmc-instruments.ts) and
 * the matching /dev/usbtmcN is opened. Each program message is one write()
 * (one USBTMC message); a query is followed by read()s that each return the
 * response's next bytes up to the buffer size, the driver ending a read at
 * the message's EOM (device-node.ts). A read that fills the buffer without a
 * final LF is followed by another; a response that ends without LF gets one,
 * the byte-stream terminator the session's framer expects (IEEE 488.2 §8.5:
 * NL^END; recalled from memory).
 *
 * Time limit: the driver bounds each read by its own timeout (5 s unless
 * changed with its USBTMC_IOCTL_SET_TIMEOUT ioctl, which Node cannot issue),
 * so a command's longer time limit is cut to the driver's.
 */
import { ScpiDisconnectedError, ScpiTimeoutError } from '../errors';
import { defaultSysfsRoot } from '../ports/sysfs';
import { OperationQueue } from '../operation-queue';
import { TransportListeners, type Transport, type WriteOptions } from '../transport';
import { openFileDeviceNode, type DeviceNode, type OpenDeviceNode } from './device-node';
import { UsbtmcNodeMissingError, UsbtmcNotFoundError, UsbtmcPermissionError, type UsbIds } from './usbtmc-errors';
import { listUsbtmcInstruments, usbResource } from '../ports/usbtmc-instruments';

export interface UsbtmcSettings {
  /** The instrument by its USB identity (lower-case hex as sysfs writes it), found through sysfs… */
  ids?: UsbIds;
  /** …or a device node given directly (/dev/usbtmc0). */
  devicePath?: string;
  sysfsRoot?: string;
  /** Opens the node; the real file by default, a stand-in in tests. */
  openNode?: OpenDeviceNode;
  /** Bytes asked for per read (default 1 MiB). */
  readChunkBytes?: number;
}

/** USBTMC_TIMEOUT in drivers/usb/class/usbtmc.c: 5000 ms. */
export const USBTMC_DRIVER_TIMEOUT_S = 5;
const DEFAULT_READ_CHUNK_BYTES = 1 << 20;
const LF = 0x0a;
/** errno codes the driver returns once the instrument is unplugged or the bus failed. */
const GONE = new Set(['ENODEV', 'ESHUTDOWN', 'EIO', 'EPIPE', 'EPROTO', 'ENXIO']);

export class UsbtmcTransport extends TransportListeners implements Transport {
  readonly description: string;
  private node: DeviceNode | undefined;
  private readonly operations = new OperationQueue();
  /** The node actually opened. */
  devicePath: string | undefined;

  constructor(private readonly settings: UsbtmcSettings) {
    super();
    this.description = `usbtmc ${settings.devicePath ?? (settings.ids ? usbResource({ vendorId: settings.ids.vendorId, productId: settings.ids.productId, serialNumber: settings.ids.serial }) : '?')}`;
  }

  get isOpen(): boolean {
    return this.node !== undefined && !this.closeReported;
  }

  async open(): Promise<void> {
    const path = this.settings.devicePath ?? this.resolve();
    const openNode = this.settings.openNode ?? openFileDeviceNode;
    try {
      this.node = await openNode(path);
      this.devicePath = path;
    } catch (error) {
      const code = (error as NodeJS.ErrnoException).code;
      if (code === 'ENOENT') throw new UsbtmcNodeMissingError(path);
      if (code === 'EACCES' || code === 'EPERM') throw new UsbtmcPermissionError(path, this.settings.ids);
      throw error;
    }
  }

  write(bytes: Uint8Array, options: WriteOptions = {}): Promise<void> {
    const node = this.node;
    if (!node || !this.isOpen) return Promise.reject(new Error('connection is not open'));
    const command = new TextDecoder('latin1').decode(bytes.subarray(0, Math.min(200, bytes.length))).replace(/\r?\n$/, '');
    const written = this.operations.run(() => node.write(bytes)).catch((error: NodeJS.ErrnoException) => {
      throw this.failed(error, command, USBTMC_DRIVER_TIMEOUT_S);
    });
    if (options.replyExpected) {
      const timeoutS = Math.min(options.timeoutS ?? USBTMC_DRIVER_TIMEOUT_S, USBTMC_DRIVER_TIMEOUT_S);
      this.operations.run(async () => {
        if (!(await written.then(() => true, () => false))) return;
        try {
          await this.readResponse(node);
        } catch (error) {
          options.onReplyFailure?.(this.failed(error as NodeJS.ErrnoException, command, timeoutS));
        }
      });
    }
    return written;
  }

  async close(): Promise<void> {
    const node = this.node;
    if (!node) return;
    await node.close().catch(() => undefined);
    this.reportClose('closed by the application');
  }

  private resolve(): string {
    const ids = this.settings.ids;
    if (!ids) throw new Error('a USBTMC address needs a device path or vendor and product ids');
    const { instruments } = listUsbtmcInstruments(this.settings.sysfsRoot ?? defaultSysfsRoot());
    const match = instruments.find(
      (i) => i.usb.vendorId.toLowerCase() === ids.vendorId && i.usb.productId.toLowerCase() === ids.productId && (ids.serial === undefined || i.usb.serialNumber === ids.serial),
    );
    if (!match) throw new UsbtmcNotFoundError(usbResource({ vendorId: ids.vendorId, productId: ids.productId, serialNumber: ids.serial }), instruments);
    return match.devicePath;
  }

  private async readResponse(node: DeviceNode): Promise<void> {
    const chunk = this.settings.readChunkBytes ?? DEFAULT_READ_CHUNK_BYTES;
    let last = -1;
    for (;;) {
      const data = await node.read(chunk);
      if (data.length > 0) {
        last = data[data.length - 1];
        this.emitData(data.slice());
      }
      // A short read ended at EOM; a full one whose last byte is LF ended a response too (common practice, no source).
      if (data.length < chunk || last === LF) break;
    }
    if (last !== LF) this.emitData(Uint8Array.of(LF));
  }

  private failed(error: NodeJS.ErrnoException, command: string, timeoutS: number): Error {
    if (error.code === 'ETIMEDOUT') return new ScpiTimeoutError(command, timeoutS, this.description);
    if (error.code && GONE.has(error.code)) {
      const reason = `the instrument is gone (${error.code}: unplugged or switched off)`;
      this.node = undefined;
      this.reportClose(reason);
      return new ScpiDisconnectedError(this.description, reason, command);
    }
    return error;
  }

}
