/**
 * A small sysfs tree in a temp folder, laid out as the kernel lays out /sys
 * (Documentation/ABI/testing/sysfs-class-tty, sysfs-bus-usb in the Linux
 * sources): class entries are links into devices/, each with a `device` link
 * to the hardware, USB devices carry idVendor/idProduct/serial/manufacturer.
 * Port listings read it through ROLLOFF_SYSFS_ROOT or their sysfsRoot option.
 */
import { mkdirSync, mkdtempSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, relative } from 'node:path';

export interface FakeUsbDevice {
  /** Bus path of the USB device, e.g. `1-2`. */
  busPath: string;
  vendorId: string;
  productId: string;
  serial?: string;
  manufacturer?: string;
  product?: string;
}

export class FakeSysfs {
  readonly root = mkdtempSync(join(tmpdir(), 'rolloff-sysfs-'));

  /** A USB device under a host controller; returns its folder. */
  usbDevice(device: FakeUsbDevice): string {
    const folder = join(this.root, 'devices/pci0000:00/0000:00:14.0/usb1', device.busPath);
    mkdirSync(folder, { recursive: true });
    this.attributes(folder, { idVendor: device.vendorId, idProduct: device.productId, serial: device.serial, manufacturer: device.manufacturer, product: device.product });
    return folder;
  }

  /** A class entry (tty, usbmisc, …) whose `device` link points at `deviceFolder` (or none: a virtual device). */
  classEntry(className: string, name: string, deviceFolder: string | undefined, attributes: Record<string, string | undefined> = {}): string {
    const entryFolder = join(deviceFolder ?? join(this.root, 'devices/virtual', className), className, name);
    mkdirSync(entryFolder, { recursive: true });
    this.attributes(entryFolder, attributes);
    if (deviceFolder) symlinkSync(relative(entryFolder, deviceFolder), join(entryFolder, 'device'));
    const link = join(this.root, 'class', className, name);
    mkdirSync(dirname(link), { recursive: true });
    symlinkSync(relative(dirname(link), entryFolder), link);
    return entryFolder;
  }

  /** A USB interface folder (`1-2:1.0`) of a USB device folder. */
  usbInterface(usbDeviceFolder: string, interfaceNumber = 0): string {
    const folder = join(usbDeviceFolder, `${usbDeviceFolder.split('/').at(-1)}:1.${interfaceNumber}`);
    mkdirSync(folder, { recursive: true });
    return folder;
  }

  /** A platform (non-USB) device folder such as a motherboard UART. */
  platformDevice(name: string): string {
    const folder = join(this.root, 'devices/pnp0', name);
    mkdirSync(folder, { recursive: true });
    return folder;
  }

  remove(): void {
    rmSync(this.root, { recursive: true, force: true });
  }

  private attributes(folder: string, attributes: Record<string, string | undefined>): void {
    for (const [name, value] of Object.entries(attributes)) if (value !== undefined) writeFileSync(join(folder, name), `${value}\n`);
  }
}

/**
 * The tree the port tests share: a USB serial adapter (ttyUSB0, under a
 * usb-serial port folder), a USB CDC-ACM instrument (ttyACM0, on the
 * interface), a motherboard UART (ttyS0, type 4 = 16550A), an empty UART slot
 * (ttyS1, type 0 = PORT_UNKNOWN, include/uapi/linux/serial_core.h) and a
 * virtual console (tty0, no device) and a USBTMC instrument (usbtmc0 under
 * class usbmisc, on its USB interface; major 180, minor 176 = USBTMC_MINOR_BASE
 * in drivers/usb/class/usbtmc.c). Identities are invented test values
 * (vendor 1209 is the open pid.codes block).
 */
export function portsTestTree(): FakeSysfs {
  const sysfs = new FakeSysfs();
  const adapter = sysfs.usbDevice({ busPath: '1-2', vendorId: '1209', productId: '0001', serial: 'TEST-ADAPTER-7', manufacturer: 'Invented Test Fixture' });
  const adapterPort = join(sysfs.usbInterface(adapter), 'ttyUSB0');
  mkdirSync(adapterPort, { recursive: true });
  sysfs.classEntry('tty', 'ttyUSB0', adapterPort);
  const instrument = sysfs.usbDevice({ busPath: '1-3', vendorId: '1209', productId: '0002', serial: 'TEST-INSTRUMENT-42' });
  sysfs.classEntry('tty', 'ttyACM0', sysfs.usbInterface(instrument));
  sysfs.classEntry('tty', 'ttyS0', sysfs.platformDevice('00:00'), { type: '4' });
  sysfs.classEntry('tty', 'ttyS1', sysfs.platformDevice('serial8250'), { type: '0' });
  sysfs.classEntry('tty', 'tty0', undefined);
  // A USBTMC instrument bound by the kernel's usbtmc driver: class usbmisc, `device` → the USB interface.
  const tmc = sysfs.usbDevice({ busPath: '1-4', vendorId: '1209', productId: '0003', serial: 'TEST-TMC-9', manufacturer: 'Invented Test Fixture' });
  sysfs.classEntry('usbmisc', 'usbtmc0', sysfs.usbInterface(tmc), { dev: '180:176' });
  return sysfs;
}
