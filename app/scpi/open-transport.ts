/** Makes the right (unopened) transport for a parsed address. */
import type { InstrumentAddress } from './address';
import { SerialTransport } from './serial-transport';
import { TcpTransport } from './tcp-transport';
import type { Transport } from './transport';
import { UsbtmcTransport } from './usbtmc/usbtmc-transport';
import { Vxi11Transport } from './vxi11/vxi11-transport';

export function transportFor(address: InstrumentAddress): Transport {
  switch (address.kind) {
    case 'serial':
      return new SerialTransport(address.serial);
    case 'tcp':
      return new TcpTransport({ host: address.host, port: address.port });
    case 'vxi11':
      return new Vxi11Transport({ host: address.host, device: address.device });
    case 'usbtmc':
      return new UsbtmcTransport({ ids: { vendorId: address.vendorId, productId: address.productId, serial: address.serial } });
    case 'usbtmc-node':
      return new UsbtmcTransport({ devicePath: address.devicePath });
  }
}
