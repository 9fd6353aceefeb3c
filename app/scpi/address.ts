/**
 * Instrument addresses: our URL forms and the VISA resource-string syntax
 * users already know. Parsed once here; everything else takes the parsed form.
 *
 *   serial:///dev/ttyUSB0?baud=9600&data=8&parity=none&stop=1&flow=none
 *   tcp://HOST:5025                 (port defaults to 5025, the common SCPI socket port)
 *   ASRL/dev/ttyUSB0::INSTR         (serial device path)
 *   ASRL3::INSTR                    (serial port number: COM3 on Windows, /dev/ttyS2 elsewhere)
 *   TCPIP::HOST::5025::SOCKET, TCPIP0::HOST::PORT::SOCKET
 *   TCPIP::HOST::INSTR, TCPIP0::HOST::inst1::INSTR   (VXI-11; device name inst0 when absent)
 *   USB::0x1209::0x0001::SERIAL::INSTR, USB0::0x1209::0x0001::SERIAL   (USBTMC; ids hex 0x… or decimal)
 *   /dev/usbtmc0                    (short form: a USBTMC device node)
 *   /dev/ttyUSB0, COM3              (short form: a serial device with 9600 8N1)
 *   HOST:PORT                       (short form: a raw socket)
 */
import { AddressError } from './errors';
import { DEFAULT_SERIAL, type FlowControl, type Parity, type SerialSettings } from './serial-transport';

export type InstrumentAddress =
  | { kind: 'serial'; serial: SerialSettings }
  | { kind: 'tcp'; host: string; port: number }
  /** VXI-11 core channel, found through the host's portmapper; `device` is the link's device name (inst0, …). */
  | { kind: 'vxi11'; host: string; device: string }
  /** USBTMC through the kernel driver: by USB identity (lower-case 4-digit hex, as sysfs writes it) or by device node. */
  | { kind: 'usbtmc'; vendorId: string; productId: string; serial?: string }
  | { kind: 'usbtmc-node'; devicePath: string };

export const DEFAULT_TCP_PORT = 5025;
/** The device name a VISA TCPIP…::INSTR resource means when it names none. */
export const DEFAULT_VXI11_DEVICE = 'inst0';

const PARITIES: Parity[] = ['none', 'even', 'odd', 'mark', 'space'];
const FLOWS: FlowControl[] = ['none', 'rtscts', 'xonxoff'];

/** A serial speed we accept: a whole number of bits per second, 50–4000000. */
export function isBaudRate(value: number): boolean {
  return Number.isInteger(value) && value >= 50 && value <= 4_000_000;
}

export function parseAddress(text: string): InstrumentAddress {
  const address = text.trim();
  if (address === '') throw new AddressError(text, 'is empty');
  if (/^serial:/i.test(address)) return parseSerialUrl(address);
  if (/^tcp:/i.test(address)) return parseTcpUrl(address);
  if (/^ASRL/i.test(address)) return parseVisaSerial(address);
  if (/^TCPIP\d*::/i.test(address)) return parseVisaTcp(address);
  if (/^USB\d*::/i.test(address)) return parseVisaUsb(address);
  if (/^\/dev\/usbtmc\d+$/.test(address)) return { kind: 'usbtmc-node', devicePath: address };
  if (/^\/dev\/\S+$/.test(address) || /^COM\d+$/i.test(address)) return { kind: 'serial', serial: { path: address, ...DEFAULT_SERIAL } };
  const hostPort = /^(\[[^\]]+\]|[A-Za-z0-9][A-Za-z0-9.-]*):(\d+)$/.exec(address);
  if (hostPort) return { kind: 'tcp', host: hostPort[1].replace(/^\[|\]$/g, ''), port: parsePort(address, hostPort[2]) };
  throw new AddressError(text, 'is not a recognised address form');
}

/** Canonical URL form, used in logs, the store and the traffic console. */
export function formatAddress(address: InstrumentAddress): string {
  if (address.kind === 'vxi11') return `TCPIP::${address.host}::${address.device}::INSTR`;
  if (address.kind === 'usbtmc') return `USB0::0x${address.vendorId.toUpperCase()}::0x${address.productId.toUpperCase()}::${address.serial ?? ''}::INSTR`;
  if (address.kind === 'usbtmc-node') return address.devicePath;
  if (address.kind === 'tcp') return `tcp://${address.host.includes(':') ? `[${address.host}]` : address.host}:${address.port}`;
  const s = address.serial;
  return `serial://${s.path}?baud=${s.baudRate}&data=${s.dataBits}&parity=${s.parity}&stop=${s.stopBits}&flow=${s.flow}`;
}

function parseSerialUrl(address: string): InstrumentAddress {
  const match = /^serial:\/\/([^?]+)(?:\?(.*))?$/i.exec(address);
  if (!match || match[1] === '') throw new AddressError(address, 'a serial address needs a device path, e.g. serial:///dev/ttyUSB0');
  const serial: SerialSettings = { path: decodeURIComponent(match[1]), ...DEFAULT_SERIAL };
  for (const pair of (match[2] ?? '').split('&').filter((p) => p !== '')) {
    const [key, value = ''] = pair.split('=');
    applySerialSetting(address, serial, key.toLowerCase(), value.toLowerCase());
  }
  return { kind: 'serial', serial };
}

function applySerialSetting(address: string, serial: SerialSettings, key: string, value: string): void {
  const number = Number(value);
  switch (key) {
    case 'baud':
      if (!isBaudRate(number)) throw new AddressError(address, `baud "${value}" is not a baud rate (50–4000000)`);
      serial.baudRate = number;
      return;
    case 'data':
      if (![5, 6, 7, 8].includes(number)) throw new AddressError(address, `data "${value}" must be 5, 6, 7 or 8`);
      serial.dataBits = number as SerialSettings['dataBits'];
      return;
    case 'parity':
      if (!PARITIES.includes(value as Parity)) throw new AddressError(address, `parity "${value}" must be one of ${PARITIES.join(', ')}`);
      serial.parity = value as Parity;
      return;
    case 'stop':
      if (![1, 1.5, 2].includes(number)) throw new AddressError(address, `stop "${value}" must be 1, 1.5 or 2`);
      serial.stopBits = number as SerialSettings['stopBits'];
      return;
    case 'flow':
      if (!FLOWS.includes(value as FlowControl)) throw new AddressError(address, `flow "${value}" must be one of ${FLOWS.join(', ')}`);
      serial.flow = value as FlowControl;
      return;
    default:
      throw new AddressError(address, `unknown serial setting "${key}" (use baud, data, parity, stop, flow)`);
  }
}

function parseTcpUrl(address: string): InstrumentAddress {
  const match = /^tcp:\/\/(\[[^\]]+\]|[^:/?#\s]+)(?::(\d+))?\/?$/i.exec(address);
  if (!match) throw new AddressError(address, 'a TCP address looks like tcp://HOST:PORT');
  const host = match[1].replace(/^\[|\]$/g, '');
  return { kind: 'tcp', host, port: parsePort(address, match[2]) };
}

function parseVisaSerial(address: string): InstrumentAddress {
  const match = /^ASRL(.+?)::INSTR$/i.exec(address);
  if (!match) throw new AddressError(address, 'a VISA serial resource looks like ASRL/dev/ttyUSB0::INSTR or ASRL3::INSTR');
  const board = match[1];
  let path: string;
  if (/^\d+$/.test(board)) {
    const number = Number(board);
    if (number < 1) throw new AddressError(address, 'VISA serial port numbers start at 1');
    // VISA numbers serial ports from 1; on Linux the first is /dev/ttyS0.
    path = process.platform === 'win32' ? `COM${number}` : `/dev/ttyS${number - 1}`;
  } else {
    path = board;
  }
  return { kind: 'serial', serial: { path, ...DEFAULT_SERIAL } };
}

function parseVisaTcp(address: string): InstrumentAddress {
  const parts = address.split('::');
  if (parts.length === 4 && /^SOCKET$/i.test(parts[3]) && parts[1] !== '') {
    return { kind: 'tcp', host: parts[1], port: parsePort(address, parts[2]) };
  }
  if ((parts.length === 3 || parts.length === 4) && /^INSTR$/i.test(parts[parts.length - 1]) && parts[1] !== '') {
    const device = parts.length === 4 ? parts[2] : DEFAULT_VXI11_DEVICE;
    // HiSLIP resources name a hislipN device; they speak another protocol on port 4880.
    if (/^hislip\d*$/i.test(device)) throw new AddressError(address, 'HiSLIP resources (…::hislip0::INSTR) are not supported; use the instrument\'s VXI-11 device (inst0) or its raw socket');
    if (!/^[A-Za-z][A-Za-z0-9_,.-]*$/.test(device)) throw new AddressError(address, `"${device}" is not a VXI-11 device name (e.g. inst0, gpib0,5)`);
    return { kind: 'vxi11', host: parts[1], device };
  }
  throw new AddressError(address, 'a VISA TCP resource looks like TCPIP::HOST::INSTR, TCPIP::HOST::inst0::INSTR or TCPIP::HOST::5025::SOCKET');
}

function parseVisaUsb(address: string): InstrumentAddress {
  const parts = address.split('::');
  if (/^INSTR$/i.test(parts[parts.length - 1])) parts.pop();
  if (parts.length < 3 || parts.length > 5) throw new AddressError(address, 'a VISA USB resource looks like USB0::0x1209::0x0001::SERIAL::INSTR');
  if (parts.length === 5) throw new AddressError(address, 'a USB interface number is not supported: the kernel driver gives each USBTMC interface its own node; use that node (/dev/usbtmcN)');
  const vendorId = usbId(address, parts[1], 'vendor');
  const productId = usbId(address, parts[2], 'product');
  const serial = parts[3];
  return { kind: 'usbtmc', vendorId, productId, ...(serial ? { serial } : {}) };
}

/** A 16-bit USB id written 0xVVVV or in decimal, as 4 lower-case hex digits (sysfs idVendor form). */
function usbId(address: string, text: string, what: string): string {
  const value = /^0x[0-9a-f]{1,4}$/i.test(text) ? parseInt(text.slice(2), 16) : /^\d{1,5}$/.test(text) ? Number(text) : NaN;
  if (!Number.isInteger(value) || value < 0 || value > 0xffff) throw new AddressError(address, `"${text}" is not a USB ${what} id (0x0000–0xFFFF)`);
  return value.toString(16).padStart(4, '0');
}

function parsePort(address: string, text: string | undefined): number {
  if (text === undefined || text === '') return DEFAULT_TCP_PORT;
  const port = Number(text);
  if (!Number.isInteger(port) || port < 1 || port > 65535) throw new AddressError(address, `port "${text}" must be 1–65535`);
  return port;
}
