/** Makes the right (unopened) transport for an address. */
import { parseAddress, type InstrumentAddress } from './address';
import { SerialTransport } from './serial-transport';
import { TcpTransport } from './tcp-transport';
import type { Transport } from './transport';

export function transportFor(address: string | InstrumentAddress): Transport {
  const parsed = typeof address === 'string' ? parseAddress(address) : address;
  return parsed.kind === 'serial' ? new SerialTransport(parsed.serial) : new TcpTransport({ host: parsed.host, port: parsed.port });
}
