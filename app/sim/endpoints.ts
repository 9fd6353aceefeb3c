/**
 * Where a simulated instrument answers: a TCP port on 127.0.0.1, or the
 * instrument end of a socat PTY pair whose other end is the user's serial
 * address. Both can drop their links on demand (fault injection) and accept
 * a reconnect afterwards.
 */
import { createServer, type Server, type Socket } from 'node:net';
import { SerialPort } from 'serialport';
import { openPtyPair, type PtyPair } from './pty-pair';
import { InstrumentLink, type LinkOptions } from './link-server';
import type { SimInstrument } from './sim-instrument';

export interface Endpoint {
  /** Address a client opens (tcp://… or serial://…). */
  address: string;
  dropLinks(): Promise<void>;
  stop(): Promise<void>;
}

/** The only interface the simulated bench listens on: it is a local simulation. */
export const LOOPBACK_HOST = '127.0.0.1';

export async function listenTcp(instrument: SimInstrument, port: number, options: LinkOptions): Promise<Endpoint> {
  const sockets = new Set<Socket>();
  const server: Server = createServer((socket) => {
    socket.setNoDelay(true);
    sockets.add(socket);
    const link = new InstrumentLink(instrument, { write: (bytes) => socket.write(bytes) }, options);
    socket.on('data', (chunk: Buffer) => link.receive(new Uint8Array(chunk.buffer, chunk.byteOffset, chunk.byteLength)));
    socket.on('close', () => {
      link.close();
      sockets.delete(socket);
    });
    socket.on('error', () => undefined);
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, LOOPBACK_HOST, () => resolve());
  });
  const actualPort = (server.address() as { port: number }).port;
  return {
    address: `tcp://${LOOPBACK_HOST}:${actualPort}`,
    dropLinks: async () => {
      for (const socket of sockets) socket.resetAndDestroy();
    },
    stop: async () => {
      for (const socket of sockets) socket.destroy();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}

/** Serial speed the simulated serial instruments report; a PTY ignores it. */
export const SIM_SERIAL_BAUD = 115200;

/**
 * `clientPath` becomes the user's serial device; the instrument holds the
 * other end at `clientPath + ".instrument"`.
 */
export async function listenPty(instrument: SimInstrument, clientPath: string, options: LinkOptions): Promise<Endpoint> {
  const instrumentPath = `${clientPath}.instrument`;
  let pair: PtyPair | undefined;
  let port: SerialPort | undefined;
  let link: InstrumentLink | undefined;
  let stopped = false;

  const start = async () => {
    pair = await openPtyPair({ a: instrumentPath, b: clientPath });
    const opened = new SerialPort({ path: instrumentPath, baudRate: SIM_SERIAL_BAUD, autoOpen: false });
    await new Promise<void>((resolve, reject) => opened.open((error) => (error ? reject(error) : resolve())));
    const current = new InstrumentLink(instrument, { write: (bytes) => opened.write(Buffer.from(bytes)) }, options);
    opened.on('data', (chunk: Buffer) => current.receive(new Uint8Array(chunk.buffer, chunk.byteOffset, chunk.byteLength)));
    opened.on('error', () => undefined);
    port = opened;
    link = current;
  };
  const teardown = async () => {
    link?.close();
    const closing = port;
    port = undefined;
    if (closing?.isOpen) await new Promise<void>((resolve) => closing.close(() => resolve()));
    await pair?.close();
    pair = undefined;
  };

  await start();
  return {
    address: `serial://${clientPath}?baud=${SIM_SERIAL_BAUD}`,
    dropLinks: async () => {
      // Tearing the pair down is what a pulled cable looks like to the client (its port closes);
      // remaking it at the same path lets the client reconnect.
      await teardown();
      if (!stopped) await start();
    },
    stop: async () => {
      stopped = true;
      await teardown();
    },
  };
}
