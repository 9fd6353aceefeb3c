/**
 * Reading the kernel's device tree (sysfs, Documentation/ABI/ in the Linux
 * sources): the one source every Linux machine has, with or without udev.
 * The root is injectable so tests can hand in a fake tree in a folder.
 */
import { readFileSync, readdirSync, realpathSync } from 'node:fs';
import { dirname, join, relative } from 'node:path';

/** `ROLLOFF_SYSFS_ROOT` points the port listings at another tree (tests); default the kernel's /sys. */
export function defaultSysfsRoot(): string {
  return process.env.ROLLOFF_SYSFS_ROOT || '/sys';
}

/** USB identity of a device, from the attributes the kernel copies out of its descriptors. */
export interface UsbIdentity {
  vendorId: string;
  productId: string;
  serialNumber?: string;
  manufacturer?: string;
  product?: string;
}

/** One attribute file's text without the trailing newline; undefined where the file does not exist. */
export function readAttribute(directory: string, name: string): string | undefined {
  try {
    return readFileSync(join(directory, name), 'utf8').trim();
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return undefined;
    throw error;
  }
}

/** Entry names of a class folder such as class/tty; throws the file-system error (ENOENT, EACCES) when unreadable. */
export function classEntries(root: string, className: string): string[] {
  return readdirSync(join(root, 'class', className)).sort(naturalOrder);
}

/** The real device folder behind a class entry (its `device` link), or undefined for a device with no hardware behind it. */
export function deviceFolder(root: string, className: string, entry: string): string | undefined {
  try {
    return realpathSync(join(root, 'class', className, entry, 'device'));
  } catch {
    return undefined;
  }
}

/**
 * Walks up from a device folder to the USB device that holds it (the first
 * parent with `idVendor`), staying inside the root. Undefined for non-USB devices.
 */
export function usbIdentityOf(root: string, device: string): UsbIdentity | undefined {
  const realRoot = realpathSync(root);
  for (let folder = device; !relative(realRoot, folder).startsWith('..') && folder !== realRoot; folder = dirname(folder)) {
    const vendorId = readAttribute(folder, 'idVendor');
    if (vendorId === undefined) continue;
    const serialNumber = readAttribute(folder, 'serial');
    const manufacturer = readAttribute(folder, 'manufacturer');
    const product = readAttribute(folder, 'product');
    return {
      vendorId,
      productId: readAttribute(folder, 'idProduct') ?? '',
      ...(serialNumber ? { serialNumber } : {}),
      ...(manufacturer ? { manufacturer } : {}),
      ...(product ? { product } : {}),
    };
  }
  return undefined;
}

/** ttyS2 before ttyS10. */
function naturalOrder(a: string, b: string): number {
  return a.localeCompare(b, 'en', { numeric: true });
}
