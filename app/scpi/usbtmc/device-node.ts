/**
 * The kernel usbtmc driver's character device (/dev/usbtmcN,
 * drivers/usb/class/usbtmc.c in the Linux sources) as the transport sees it:
 * one write() is one USBTMC message (the driver sets EOM on its last
 * transfer), one read() asks the instrument for a response (REQUEST_DEV_DEP_
 * MSG_IN) and returns its bytes, up to the buffer's size, ending early at
 * EOM; a read with nothing to answer fails with ETIMEDOUT after the driver's
 * timeout (5 s by default, USBTMC_TIMEOUT). Behind an interface so tests can
 * hand in a stand-in with the same semantics: no test machine has a USBTMC
 * instrument plugged in.
 */
import { open, type FileHandle } from 'node:fs/promises';

export interface DeviceNode {
  /** One whole message. */
  write(bytes: Uint8Array): Promise<void>;
  /** One response (or its next `maxBytes`); rejects with an errno-style error (code ETIMEDOUT, EIO, ENODEV…). */
  read(maxBytes: number): Promise<Uint8Array>;
  close(): Promise<void>;
}

export type OpenDeviceNode = (path: string) => Promise<DeviceNode>;

/** The real device node: read and write through the file system, as the driver expects. */
export const openFileDeviceNode: OpenDeviceNode = async (path) => {
  const handle: FileHandle = await open(path, 'r+');
  return {
    write: async (bytes) => {
      const { bytesWritten } = await handle.write(bytes, 0, bytes.length);
      if (bytesWritten !== bytes.length) throw Object.assign(new Error(`the driver took ${bytesWritten} of ${bytes.length} bytes`), { code: 'EIO' });
    },
    read: async (maxBytes) => {
      const buffer = new Uint8Array(maxBytes);
      // position null: a character device has no file position.
      const { bytesRead } = await handle.read(buffer, 0, maxBytes, null);
      return buffer.subarray(0, bytesRead);
    },
    close: () => handle.close(),
  };
};
