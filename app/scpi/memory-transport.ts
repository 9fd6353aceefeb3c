/**
 * An in-process pair of connected transports: what one side writes, the other
 * receives. For unit tests and for running the virtual bench inside the same
 * process. Delivery is asynchronous (next macrotask) like a real link, so
 * ordering bugs show up here too.
 */
import type { Transport } from './transport';

class MemoryEnd implements Transport {
  peer!: MemoryEnd;
  private dataListeners: Array<(bytes: Uint8Array) => void> = [];
  private closeListeners: Array<(reason: string) => void> = [];
  private open_ = false;
  private closed = false;

  constructor(readonly description: string) {}

  get isOpen(): boolean {
    return this.open_ && !this.closed;
  }

  async open(): Promise<void> {
    if (this.closed) throw new Error(`${this.description} was closed`);
    this.open_ = true;
  }

  async write(bytes: Uint8Array): Promise<void> {
    if (!this.isOpen) throw new Error(`${this.description} is not open`);
    const copy = bytes.slice();
    setImmediate(() => this.peer.deliver(copy));
  }

  onData(listener: (bytes: Uint8Array) => void): void {
    this.dataListeners.push(listener);
  }

  onClose(listener: (reason: string) => void): void {
    this.closeListeners.push(listener);
  }

  async close(): Promise<void> {
    this.shut('closed locally');
    this.peer.shut('peer closed the link');
  }

  private deliver(bytes: Uint8Array): void {
    if (this.closed) return;
    for (const listener of this.dataListeners) listener(bytes);
  }

  shut(reason: string): void {
    if (this.closed) return;
    this.closed = true;
    for (const listener of this.closeListeners) listener(reason);
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
