/** Makes the right (unopened) transport for a parsed address. */
import type { InstrumentAddress } from './address';
import { SerialTransport } from './serial-transport';
import { TcpTransport } from './tcp-transport';
import type { Transport } from './transport';

export function transportFor(address: InstrumentAddress): Transport {
  return address.kind === 'serial' ? new SerialTransport(address.serial) : new TcpTransport({ host: address.host, port: address.port });
}
