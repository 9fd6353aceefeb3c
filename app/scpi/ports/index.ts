/**
 * Every port listing the Bench view and `rolloff ports` show, one module per
 * kind of connection (serial here; others sit beside it), combined into one
 * answer that says in one line what could not be learned.
 */
import type { PortListing } from '../../contract/contract';
import { listSerialPorts, type SerialListOptions } from './serial-ports';

export { listSerialPorts, listFromSysfs, type SerialPortListing, type SerialListOptions } from './serial-ports';
export { defaultSysfsRoot, usbIdentityOf, type UsbIdentity } from './sysfs';

export async function listPorts(options: SerialListOptions = {}): Promise<PortListing> {
  const serial = await listSerialPorts(options);
  const gaps = [...serial.gaps];
  return { ports: serial.ports, ...(gaps.length > 0 ? { incomplete: `${gaps.join('; ')}.` } : {}) };
}

