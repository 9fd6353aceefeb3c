/**
 * The byte pipe a SCPI session talks through. Serial, TCP and the in-process
 * pair all implement it; the session never knows which one it has, so the
 * virtual bench and unit tests exercise exactly the code real instruments do.
 */
export interface Transport {
  /** Human-readable link name for messages and logs, e.g. "serial /dev/ttyUSB0 9600 8N1". */
  readonly description: string;
  readonly isOpen: boolean;
  open(): Promise<void>;
  /** Resolves once the bytes are handed to the OS (or peer). */
  write(bytes: Uint8Array): Promise<void>;
  /** Bytes as they arrive, in order, with no framing applied. */
  onData(listener: (bytes: Uint8Array) => void): void;
  /** Called once when the link closes for any reason, including close(). */
  onClose(listener: (reason: string) => void): void;
  close(): Promise<void>;
}
