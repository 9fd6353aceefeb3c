/**
 * The byte pipe a SCPI session talks through. Serial, TCP and the in-process
 * pair all implement it; the session never knows which one it has, so the
 * simulated bench and unit tests exercise exactly the code real instruments do.
 */
export interface Transport {
  /** Human-readable link name for messages and logs, e.g. "serial /dev/ttyUSB0 9600 8N1". */
  readonly description: string;
  readonly isOpen: boolean;
  open(): Promise<void>;
  /**
   * Resolves once the bytes are handed to the OS (or peer). One call carries
   * one whole program message. A message-based link (VXI-11, USBTMC) must ask
   * the instrument for a response, so it is told when one is expected; a
   * byte stream ignores the options.
   */
  write(bytes: Uint8Array, options?: WriteOptions): Promise<void>;
  /** Bytes as they arrive, in order, with no framing applied. */
  onData(listener: (bytes: Uint8Array) => void): void;
  /** Called once when the link closes for any reason, including close(). */
  onClose(listener: (reason: string) => void): void;
  close(): Promise<void>;
}

export interface WriteOptions {
  /** The message holds a query: its response is to be read (IEEE 488.2 §6, recalled from memory). */
  replyExpected?: boolean;
  /** How long the instrument may take to respond, seconds (the command's time limit). */
  timeoutS?: number;
  /**
   * A message-based link could not read this message's response without the
   * link closing (a timeout, a lock held elsewhere). Given per message, so the
   * late failure of a query the session already gave up on cannot fail the next one.
   */
  onReplyFailure?: (error: Error) => void;
}

/**
 * The listener bookkeeping every Transport shares: bytes handed to each data
 * listener in order, and the close reported once, whatever closes the link first.
 */
export abstract class TransportListeners {
  private readonly dataListeners: Array<(bytes: Uint8Array) => void> = [];
  private readonly closeListeners: Array<(reason: string) => void> = [];
  /** The close has been reported: the link is closed for good. */
  protected closeReported = false;

  onData(listener: (bytes: Uint8Array) => void): void {
    this.dataListeners.push(listener);
  }

  onClose(listener: (reason: string) => void): void {
    this.closeListeners.push(listener);
  }

  protected emitData(bytes: Uint8Array): void {
    for (const listener of this.dataListeners) listener(bytes);
  }

  protected reportClose(reason: string): void {
    if (this.closeReported) return;
    this.closeReported = true;
    for (const listener of this.closeListeners) listener(reason);
  }
}
