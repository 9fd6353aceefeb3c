/**
 * An in-process pair of connected transports: what one side writes, the other
 * receives. For unit tests and for running the simulated bench inside the same
 * process. Delivery is asynchronous (next macrotask) like a real link, so
 * ordering bugs show up here too.
 */
import { TransportListeners, type Transport } from './transport';

class MemoryEnd extends TransportListeners implements Transport {
  peer!: MemoryEnd;
  private open_ = false;

  constructor(readonly description: string) {
    super();
  }

  get isOpen(): boolean {
    return this.open_ && !this.closeReported;
  }

  async open(): Promise<void> {
    if (this.closeReported) throw new Error(`${this.description} was closed`);
    this.open_ = true;
  }

  async write(bytes: Uint8Array): Promise<void> {
    if (!this.isOpen) throw new Error(`${this.description} is not open`);
    const copy = bytes.slice();
    setImmediate(() => this.peer.deliver(copy));
  }

  async close(): Promise<void> {
    this.reportClose('closed locally');
    this.peer.reportClose('peer closed the link');
  }

  private deliver(bytes: Uint8Array): void {
    if (this.closeReported) return;
    this.emitData(bytes);
  }
}

/** Two connected ends, both opened. */
export function memoryTransportPair(name = 'memory link'): { a: Transport; b: Transport } {
  const a = new MemoryEnd(`${name} (a)`);
  const b = new MemoryEnd(`${name} (b)`);
  a.peer = b;
  b.peer = a;
  void a.open();
  void b.open();
  return { a, b };
}
