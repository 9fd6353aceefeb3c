/**
 * USBTMC instruments the kernel's usbtmc driver has bound, from sysfs: the
 * driver registers each interface as a usbmisc class device named usbtmcN
 * (usb_register_dev in drivers/usb/core/file.c), so /sys/class/usbmisc/usbtmcN
 * has a `device` link to the USB interface (…/1-2/1-2:1.0) whose parent USB
 * device carries idVendor, idProduct and serial (Documentation/ABI/testing/
 * sysfs-bus-usb). The node the user opens is /dev/usbtmcN.
 */
import { join } from 'node:path';
import { classEntries, deviceFolder, usbIdentityOf, type UsbIdentity } from './sysfs';

export interface UsbtmcInstrument {
  /** /dev/usbtmcN. */
  devicePath: string;
  usb: UsbIdentity;
  /** The VISA resource string that finds this instrument again, whatever N it gets next time. */
  resource: string;
}

const USBTMC_NAME = /^usbtmc\d+$/;

/** Every bound USBTMC interface; an unreadable usbmisc class gives an empty list and the reason. */
export function listUsbtmcInstruments(root: string): { instruments: UsbtmcInstrument[]; gaps: string[] } {
  let entries: string[];
  try {
    entries = classEntries(root, 'usbmisc');
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    // No usbmisc class at all: no usbtmc driver loaded and no other usbmisc device, nothing missed.
    if (code === 'ENOENT') return { instruments: [], gaps: [] };
    return { instruments: [], gaps: [`could not read ${join(root, 'class/usbmisc')} (${code ?? String(error)}), so no USBTMC instruments are listed`] };
  }
  const instruments: UsbtmcInstrument[] = [];
  const gaps: string[] = [];
  for (const name of entries) {
    if (!USBTMC_NAME.test(name)) continue;
    const device = deviceFolder(root, 'usbmisc', name);
    if (device === undefined) continue;
    try {
      const usb = usbIdentityOf(root, device);
      if (!usb) continue;
      instruments.push({ devicePath: `/dev/${name}`, usb, resource: usbResource(usb) });
    } catch (error) {
      gaps.push(`the USB identity of ${name} could not be read (${(error as NodeJS.ErrnoException).code ?? String(error)})`);
    }
  }
  return { instruments, gaps };
}

/** USB0::0xVVVV::0xPPPP::SERIAL::INSTR (VISA resource syntax; hexadecimal ids as VISA prints them). */
export function usbResource(usb: Pick<UsbIdentity, 'vendorId' | 'productId' | 'serialNumber'>): string {
  const hex = (id: string) => `0x${id.toUpperCase().padStart(4, '0')}`;
  return `USB0::${hex(usb.vendorId)}::${hex(usb.productId)}::${usb.serialNumber ?? ''}::INSTR`;
}
