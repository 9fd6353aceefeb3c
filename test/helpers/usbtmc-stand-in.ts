/**
 * A stand-in for the kernel usbtmc driver's character device (no test
 * machine has a USBTMC instrument): it reproduces what the transport relies
 * on in drivers/usb/class/usbtmc.c —
 *   - one write() is one message (EOM on its last transfer), handed whole to
 *     the instrument;
 *   - one read() returns the pending response's next bytes, at most the
 *     count asked for; a response longer than that is continued by the next
 *     read();
 *   - a read() with no response coming fails with ETIMEDOUT after the
 *     driver's timeout;
 *   - once the device is unplugged every call fails with ENODEV;
 *   - open() fails with ENOENT for a node that does not exist and EACCES for
 *     one this user may not open.
 * Behind it sits a real simulated instrument (app/sim), fed through the same
 * InstrumentLink every other transport's server uses.
 */
import type { DeviceNode, OpenDeviceNode } from '../../app/scpi/usbtmc/device-node';
import { InstrumentLink } from '../../app/sim/link-server';
import { FaultState } from '../../app/sim/faults';
import type { SimInstrument } from '../../app/sim/sim-instrument';
import { SeededRandom } from '../../app/numeric';

const LF = 0x0a;

function errno(code: string, message: string): NodeJS.ErrnoException {
  return Object.assign(new Error(`${code}: ${message}`), { code });
}

export class UsbtmcStandIn {
  readonly faults = new FaultState();
  /** read() calls made, to show a long response took several. */
  readCalls = 0;
  private responses: Uint8Array[] = [];
  private waiter: (() => void) | undefined;
  private unplugged = false;
  private readonly link: InstrumentLink;

  constructor(
    instrument: SimInstrument,
    /** The nodes that exist, and whether this user may open each. */
    private readonly nodes: Record<string, 'ok' | 'no-permission'>,
    private readonly driverTimeoutMs = 5000,
  ) {
    this.link = new InstrumentLink(instrument, { write: (bytes) => this.respond(bytes.slice()) }, { latencyS: 0, faults: this.faults, random: new SeededRandom(7) });
  }

  readonly open: OpenDeviceNode = async (path) => {
    const access = this.nodes[path];
    if (access === undefined) throw errno('ENOENT', `no such file or directory, open '${path}'`);
    if (access === 'no-permission') throw errno('EACCES', `permission denied, open '${path}'`);
    const node: DeviceNode = {
      write: async (bytes) => {
        if (this.unplugged) throw errno('ENODEV', 'no such device');
        this.link.receive(bytes);
        // EOM ends the message, as LF would on a byte stream.
        if (bytes[bytes.length - 1] !== LF) this.link.receive(Uint8Array.of(LF));
      },
      read: (maxBytes) => this.read(maxBytes),
      close: async () => undefined,
    };
    return node;
  };

  unplug(): void {
    this.unplugged = true;
    this.waiter?.();
  }

  private respond(bytes: Uint8Array): void {
    this.responses.push(bytes);
    this.waiter?.();
  }

  private async read(maxBytes: number): Promise<Uint8Array> {
    this.readCalls++;
    if (this.unplugged) throw errno('ENODEV', 'no such device');
    if (this.responses.length === 0) {
      await new Promise<void>((resolve) => {
        const timer = setTimeout(resolve, this.driverTimeoutMs);
        this.waiter = () => {
          clearTimeout(timer);
          resolve();
        };
      });
      this.waiter = undefined;
      if (this.unplugged) throw errno('ENODEV', 'no such device');
      if (this.responses.length === 0) throw errno('ETIMEDOUT', 'connection timed out');
    }
    const response = this.responses[0];
    if (response.length <= maxBytes) {
      this.responses.shift();
      return response;
    }
    this.responses[0] = response.subarray(maxBytes);
    return response.subarray(0, maxBytes);
  }
}
