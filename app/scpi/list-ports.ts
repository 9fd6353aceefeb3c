/** Serial ports the OS reports, with USB identities where known (for the Bench view and `rolloff ports`). */
import { SerialPort } from 'serialport';
import type { PortInfo } from '../contract/contract';

export async function listSerialPorts(): Promise<PortInfo[]> {
  const ports = await SerialPort.list();
  return ports.map((p) => ({
    path: p.path,
    ...(p.manufacturer ? { manufacturer: p.manufacturer } : {}),
    ...(p.serialNumber ? { serialNumber: p.serialNumber } : {}),
    ...(p.vendorId ? { vendorId: p.vendorId } : {}),
    ...(p.productId ? { productId: p.productId } : {}),
  }));
}
