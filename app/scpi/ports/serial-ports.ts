/**
 * Serial ports the machine offers, with USB identities where known, for the
 * Bench view and `rolloff ports`. On Linux the kernel's own list
 * (/sys/class/tty) is the base, and udev's answers (through the serialport
 * library, which spawns udevadm) only add to it: minimal installs and
 * containers have no udevadm, and a missing or failing helper is no reason to
 * show no ports.
 */
import { SerialPort } from 'serialport';
import { accessSync, constants } from 'node:fs';
import { delimiter, join } from 'node:path';
import type { PortInfo } from '../../contract/contract';
import { classEntries, defaultSysfsRoot, deviceFolder, readAttribute, usbIdentityOf } from './sysfs';

/** Ports found, and what the listing could not learn (each a short clause; empty when nothing was missed). */
export interface SerialPortListing {
  ports: PortInfo[];
  gaps: string[];
}

export interface SerialListOptions {
  /** Read this tree instead of /sys (tests); also set by ROLLOFF_SYSFS_ROOT. Implies the kernel's list. */
  sysfsRoot?: string;
  platform?: NodeJS.Platform;
  /** PATH searched for udevadm. */
  searchPath?: string;
}

/**
 * Device names the serialport library lists on Linux (its linux-list.js), so
 * both sources agree on what counts as a serial port; pseudo-terminals and
 * virtual consoles are left out.
 */
const SERIAL_TTY_NAME = /^(tty(S|WCH|ACM|USB|AMA|MFD|O|XRUSB)\d+|rfcomm\d+)$/;

export async function listSerialPorts(options: SerialListOptions = {}): Promise<SerialPortListing> {
  const platform = options.platform ?? process.platform;
  if (platform !== 'linux') return listThroughLibrary();
  // The kernel's list is the base on Linux; udev, where present, only adds what it knows about the same ports.
  const explicitRoot = options.sysfsRoot ?? process.env.ROLLOFF_SYSFS_ROOT;
  const root = explicitRoot || defaultSysfsRoot();
  const kernel = listFromSysfs(root);
  if (!onPath('udevadm', options.searchPath ?? process.env.PATH ?? '')) {
    return { ports: kernel.ports, gaps: ['udevadm not found, so ports were read from the kernel and the /dev/serial/by-id names udev keeps are not known', ...kernel.gaps] };
  }
  // A tree handed in (tests) describes another machine than udev does: do not mix the two.
  if (explicitRoot) return kernel;
  const throughUdev = await listThroughLibrary();
  if (throughUdev.gaps.length > 0) return { ports: kernel.ports, gaps: [`udev's port list failed (${throughUdev.gaps.join('; ')}), so ports were read from the kernel only`, ...kernel.gaps] };
  return { ports: mergeByPath(kernel.ports, throughUdev.ports), gaps: kernel.gaps };
}

/** The kernel's ports with udev's details filled in, plus any port only udev knows, in path order. */
function mergeByPath(kernel: PortInfo[], udev: PortInfo[]): PortInfo[] {
  const byPath = new Map(kernel.map((port) => [port.path, port]));
  for (const port of udev) byPath.set(port.path, { ...byPath.get(port.path), ...port });
  return [...byPath.values()].sort((a, b) => a.path.localeCompare(b.path, 'en', { numeric: true }));
}

/** The kernel's serial ports: class/tty entries with hardware behind them, USB identities from the parent USB device. */
export function listFromSysfs(root: string): SerialPortListing {
  let entries: string[];
  try {
    entries = classEntries(root, 'tty');
  } catch (error) {
    return { ports: [], gaps: [`could not read ${join(root, 'class/tty')} (${(error as NodeJS.ErrnoException).code ?? String(error)}), so no serial ports are listed`] };
  }
  const ports: PortInfo[] = [];
  const gaps: string[] = [];
  for (const name of entries) {
    if (!SERIAL_TTY_NAME.test(name)) continue;
    const device = deviceFolder(root, 'tty', name);
    if (device === undefined) continue;
    try {
      // serial_core reports type 0 (PORT_UNKNOWN) for a UART slot with no chip behind it (include/uapi/linux/serial_core.h).
      if (readAttribute(join(root, 'class/tty', name), 'type') === '0') continue;
      const usb = usbIdentityOf(root, device);
      ports.push({
        path: `/dev/${name}`,
        ...(usb?.manufacturer ? { manufacturer: usb.manufacturer } : {}),
        ...(usb?.serialNumber ? { serialNumber: usb.serialNumber } : {}),
        ...(usb ? { vendorId: usb.vendorId, productId: usb.productId } : {}),
      });
    } catch (error) {
      ports.push({ path: `/dev/${name}` });
      gaps.push(`the USB identity of ${name} could not be read (${(error as NodeJS.ErrnoException).code ?? String(error)})`);
    }
  }
  return { ports, gaps };
}

/** The serialport library's list (udev on Linux, the registry on Windows, IOKit on macOS). */
async function listThroughLibrary(): Promise<SerialPortListing> {
  try {
    const ports = await SerialPort.list();
    return {
      ports: ports.map((p) => ({
        path: p.path,
        ...(p.manufacturer ? { manufacturer: p.manufacturer } : {}),
        ...(p.serialNumber ? { serialNumber: p.serialNumber } : {}),
        ...(p.vendorId ? { vendorId: p.vendorId } : {}),
        ...(p.productId ? { productId: p.productId } : {}),
      })),
      gaps: [],
    };
  } catch (error) {
    return { ports: [], gaps: [error instanceof Error ? error.message : String(error)] };
  }
}

function onPath(program: string, searchPath: string): boolean {
  return searchPath.split(delimiter).some((folder) => {
    if (!folder) return false;
    try {
      accessSync(join(folder, program), constants.X_OK);
      return true;
    } catch {
      return false;
    }
  });
}
