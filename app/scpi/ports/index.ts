/**
 * Every port listing the Bench view and `rolloff ports` show, one module per
 * kind of connection (serial ports here, USBTMC instruments in ../usbtmc), combined into one
 * answer that says in one line what could not be learned.
 */
import type { PortInfo, PortListing } from '../../contract/contract';
import { listUsbtmcInstruments } from './usbtmc-instruments';
import { listSerialPorts, type SerialListOptions } from './serial-ports';
import { defaultSysfsRoot } from './sysfs';

export { listSerialPorts, listFromSysfs, type SerialPortListing, type SerialListOptions } from './serial-ports';
export { defaultSysfsRoot, usbIdentityOf, type UsbIdentity } from './sysfs';

export async function listPorts(options: SerialListOptions = {}): Promise<PortListing> {
  const serial = await listSerialPorts(options);
  // The usbtmc driver and its sysfs entries are Linux's; elsewhere USBTMC goes through a vendor VISA, not this listing.
  const usbtmc = (options.platform ?? process.platform) === 'linux' ? listUsbtmcInstruments(options.sysfsRoot ?? defaultSysfsRoot()) : { instruments: [], gaps: [] };
  const gaps = [...serial.gaps, ...usbtmc.gaps];
  const ports: PortInfo[] = [
    ...serial.ports.map((port): PortInfo => ({ ...port, kind: 'serial', address: `ASRL${port.path}::INSTR` })),
    ...usbtmc.instruments.map(
      (instrument): PortInfo => ({
        path: instrument.devicePath,
        kind: 'usbtmc',
        address: instrument.resource,
        vendorId: instrument.usb.vendorId,
        productId: instrument.usb.productId,
        ...(instrument.usb.serialNumber ? { serialNumber: instrument.usb.serialNumber } : {}),
        ...(instrument.usb.manufacturer ? { manufacturer: instrument.usb.manufacturer } : {}),
      }),
    ),
  ];
  return { ports, ...(gaps.length > 0 ? { incomplete: `${gaps.join('; ')}.` } : {}) };
}

