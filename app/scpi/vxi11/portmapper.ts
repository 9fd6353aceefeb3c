/**
 * The portmapper, version 2 (RFC 1833 §3, recalled from memory): program
 * 100000 on port 111 maps (program, version, protocol) to a port. GETPORT
 * finds a VXI-11 instrument's core channel; SET and UNSET register and
 * unregister the simulated bench's server. Debian's rpcbind answers version 2
 * beside its own versions 3 and 4, and accepts SET/UNSET from loopback callers.
 */
import { Socket } from 'node:net';
import { RpcClient } from './rpc-client';
import { XdrWriter } from './xdr';

export const PORTMAPPER_PROGRAM = 100000;
export const PORTMAPPER_VERSION = 2;
export const PORTMAPPER_PORT = 111;
export const IPPROTO_TCP = 6;

const PMAPPROC_SET = 1;
const PMAPPROC_UNSET = 2;
const PMAPPROC_GETPORT = 3;

export interface Mapping {
  program: number;
  version: number;
  /** IPPROTO_TCP for every mapping we make or look up. */
  protocol?: number;
  port: number;
}

function encodeMapping(mapping: Mapping): Uint8Array {
  return new XdrWriter().uint(mapping.program).uint(mapping.version).uint(mapping.protocol ?? IPPROTO_TCP).uint(mapping.port).finish();
}

async function callPortmapper<T>(host: string, timeoutMs: number, run: (client: RpcClient) => Promise<T>): Promise<T> {
  const client = await RpcClient.connect(host, PORTMAPPER_PORT, timeoutMs);
  try {
    return await run(client);
  } finally {
    client.close();
  }
}

/** The TCP port the program is registered on, or 0 when it is not registered. */
export function getPort(host: string, program: number, version: number, timeoutMs: number): Promise<number> {
  return callPortmapper(host, timeoutMs, async (client) =>
    (await client.call(PORTMAPPER_PROGRAM, PORTMAPPER_VERSION, PMAPPROC_GETPORT, encodeMapping({ program, version, port: 0 }), timeoutMs, 'portmapper GETPORT')).uint(),
  );
}

/** Registers a mapping; false when the portmapper refused it (the program is already registered). */
export function setMapping(host: string, mapping: Mapping, timeoutMs: number): Promise<boolean> {
  return callPortmapper(host, timeoutMs, async (client) =>
    (await client.call(PORTMAPPER_PROGRAM, PORTMAPPER_VERSION, PMAPPROC_SET, encodeMapping(mapping), timeoutMs, 'portmapper SET')).bool(),
  );
}

/** Removes every mapping of (program, version); the port field is ignored (RFC 1833 §3.2). */
export function unsetMapping(host: string, program: number, version: number, timeoutMs: number): Promise<boolean> {
  return callPortmapper(host, timeoutMs, async (client) =>
    (await client.call(PORTMAPPER_PROGRAM, PORTMAPPER_VERSION, PMAPPROC_UNSET, encodeMapping({ program, version, port: 0 }), timeoutMs, 'portmapper UNSET')).bool(),
  );
}

/** Whether anything accepts a TCP connection on host:port (is the portmapper, or a registered server, alive?). */
export function portAnswers(host: string, port: number, timeoutMs: number): Promise<boolean> {
  return new Promise((resolve) => {
    const socket = new Socket();
    const done = (value: boolean) => {
      socket.destroy();
      resolve(value);
    };
    socket.setTimeout(timeoutMs, () => done(false));
    socket.once('error', () => done(false));
    socket.connect(port, host, () => done(true));
  });
}
