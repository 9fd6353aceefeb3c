/**
 * Why a USBTMC instrument could not be opened, each with what to do: not
 * plugged in or not bound by the driver, bound but without a device node, or
 * a node this user may not open (the udev rule that grants it).
 */
import { ScpiError } from '../errors';
import type { UsbtmcInstrument } from '../ports/usbtmc-instruments';

export interface UsbIds {
  vendorId: string;
  productId: string;
  serial?: string;
}

/** No bound USBTMC interface matches the resource string. */
export class UsbtmcNotFoundError extends ScpiError {
  constructor(resource: string, found: UsbtmcInstrument[]) {
    super(
      `no USBTMC instrument matches ${resource}${found.length ? `; the driver has bound: ${found.map((i) => `${i.resource} (${i.devicePath})`).join(', ')}` : '; the kernel\'s usbtmc driver has bound no instrument'}`,
      'Check the cable and that the instrument is on and set to USB (USBTMC) remote control; "lsmod | grep usbtmc" shows whether the driver is loaded (modprobe usbtmc loads it). "rolloff ports" lists USBTMC instruments with the resource string to use.',
    );
  }
}

/** The driver has the instrument, but its /dev node is not there (no udev, a container without /dev). */
export class UsbtmcNodeMissingError extends ScpiError {
  constructor(path: string) {
    super(
      `${path} does not exist, though the kernel's usbtmc driver has the instrument`,
      'udev normally makes the node; on a machine or container without udev, create it (the major and minor numbers are in /sys/class/usbmisc/' +
        `${path.split('/').pop()}/dev) with mknod, or pass the host's /dev through to the container.`,
    );
  }
}

/** The node exists but this user may not open it. */
export class UsbtmcPermissionError extends ScpiError {
  readonly udevRule: string;
  constructor(path: string, ids: UsbIds | undefined) {
    const rule = udevRuleFor(ids);
    super(
      `permission denied opening ${path}: this user may not read and write the instrument's USBTMC device node`,
      `Give the node to a group you are in with a udev rule, e.g. in /etc/udev/rules.d/60-usbtmc.rules:\n  ${rule}\n` +
        'then run "sudo udevadm control --reload-rules && sudo udevadm trigger", add yourself to the group ("sudo usermod -aG plugdev $USER") and log in again.',
    );
    this.udevRule = rule;
  }
}

/** A udev rule (udev(7) syntax) that makes usbtmc nodes group-writable by plugdev, for one instrument when its ids are known. */
export function udevRuleFor(ids: UsbIds | undefined): string {
  const match = ids ? `, ATTRS{idVendor}=="${ids.vendorId.toLowerCase()}", ATTRS{idProduct}=="${ids.productId.toLowerCase()}"` : '';
  return `SUBSYSTEM=="usbmisc", KERNEL=="usbtmc[0-9]*"${match}, GROUP="plugdev", MODE="0660"`;
}
