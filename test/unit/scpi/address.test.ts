/**
 * Addresses: our URL forms and VISA resource strings (VISA resource syntax,
 * common practice: ASRLn::INSTR, TCPIP[board]::host::port::SOCKET).
 */
import { describe, expect, it } from 'vitest';
import { AddressError, formatAddress, parseAddress } from '../../../app/scpi';

describe('parseAddress', () => {
  it('reads a serial URL with every setting', () => {
    expect(parseAddress('serial:///dev/ttyUSB0?baud=19200&data=7&parity=even&stop=2&flow=rtscts')).toEqual({
      kind: 'serial',
      serial: { path: '/dev/ttyUSB0', baudRate: 19200, dataBits: 7, parity: 'even', stopBits: 2, flow: 'rtscts' },
    });
  });

  it('defaults a bare serial URL to 9600 8N1 without flow control (common practice)', () => {
    expect(parseAddress('serial:///dev/ttyACM0')).toEqual({ kind: 'serial', serial: { path: '/dev/ttyACM0', baudRate: 9600, dataBits: 8, parity: 'none', stopBits: 1, flow: 'none' } });
  });

  it('reads tcp URLs, defaulting to port 5025 (common SCPI socket port)', () => {
    expect(parseAddress('tcp://127.0.0.1:6000')).toEqual({ kind: 'tcp', host: '127.0.0.1', port: 6000 });
    expect(parseAddress('tcp://bench-host')).toEqual({ kind: 'tcp', host: 'bench-host', port: 5025 });
  });

  it('reads VISA serial resources by path and by number', () => {
    expect(parseAddress('ASRL/dev/ttyUSB1::INSTR')).toMatchObject({ kind: 'serial', serial: { path: '/dev/ttyUSB1' } });
    const numbered = parseAddress('ASRL3::INSTR');
    expect(numbered.kind === 'serial' && numbered.serial.path).toBe(process.platform === 'win32' ? 'COM3' : '/dev/ttyS2');
  });

  it('reads VISA socket resources with and without a board number', () => {
    expect(parseAddress('TCPIP::127.0.0.1::5025::SOCKET')).toEqual({ kind: 'tcp', host: '127.0.0.1', port: 5025 });
    expect(parseAddress('TCPIP0::127.0.0.1::7000::SOCKET')).toEqual({ kind: 'tcp', host: '127.0.0.1', port: 7000 });
    expect(parseAddress('tcpip0::localhost::7000::socket')).toEqual({ kind: 'tcp', host: 'localhost', port: 7000 });
  });

  it('reads VISA VXI-11 resources, the device name inst0 when none is given (VISA resource syntax, common practice)', () => {
    expect(parseAddress('TCPIP::127.0.0.1::INSTR')).toEqual({ kind: 'vxi11', host: '127.0.0.1', device: 'inst0' });
    expect(parseAddress('TCPIP0::127.0.0.1::inst2::INSTR')).toEqual({ kind: 'vxi11', host: '127.0.0.1', device: 'inst2' });
    expect(parseAddress('tcpip::localhost::gpib0,5::instr')).toEqual({ kind: 'vxi11', host: 'localhost', device: 'gpib0,5' });
  });

  it('reads VISA USB resources (USBTMC): ids in hex or decimal, INSTR optional, serial number kept as written', () => {
    expect(parseAddress('USB0::0x1209::0x0003::TEST-TMC-9::INSTR')).toEqual({ kind: 'usbtmc', vendorId: '1209', productId: '0003', serial: 'TEST-TMC-9' });
    expect(parseAddress('usb::4617::3::ab12')).toEqual({ kind: 'usbtmc', vendorId: '1209', productId: '0003', serial: 'ab12' });
    expect(parseAddress('/dev/usbtmc2')).toEqual({ kind: 'usbtmc-node', devicePath: '/dev/usbtmc2' });
  });

  it('reads the short forms the Bench view suggests: a device path and HOST:PORT', () => {
    expect(parseAddress('/dev/ttyUSB0')).toEqual({ kind: 'serial', serial: { path: '/dev/ttyUSB0', baudRate: 9600, dataBits: 8, parity: 'none', stopBits: 1, flow: 'none' } });
    expect(parseAddress('127.0.0.1:5025')).toEqual({ kind: 'tcp', host: '127.0.0.1', port: 5025 });
    expect(parseAddress('[::1]:6000')).toEqual({ kind: 'tcp', host: '::1', port: 6000 });
  });

  it('round-trips through the canonical form', () => {
    for (const text of ['serial:///dev/ttyUSB0?baud=115200', 'tcp://127.0.0.1:5025', 'TCPIP::127.0.0.1::inst1::INSTR', 'USB0::0x1209::0x00AB::S1::INSTR', '/dev/usbtmc0']) {
      const parsed = parseAddress(text);
      expect(parseAddress(formatAddress(parsed))).toEqual(parsed);
    }
  });

  it.each([
    ['', /empty/],
    ['foo', /not a recognised/],
    ['tcp://127.0.0.1:99999', /port/],
    ['serial:///dev/ttyUSB0?baud=fast', /baud/],
    ['serial:///dev/ttyUSB0?parity=sometimes', /parity/],
    ['serial:///dev/ttyUSB0?speed=9600', /unknown serial setting/],
    ['TCPIP::127.0.0.1::hislip0::INSTR', /HiSLIP/],
    ['TCPIP::127.0.0.1::in st0::INSTR', /not a VXI-11 device name/],
    ['TCPIP::127.0.0.1', /TCPIP::HOST::INSTR/],
    ['127.0.0.1:70000', /port/],
    ['USB0::0x12345::0x0001::S::INSTR', /not a USB vendor id/],
    ['USB0::0x1209::0x0001::S::0::INSTR', /interface number/],
    ['USB0::0x1209::INSTR', /looks like USB0::/],
    ['ASRL0::INSTR', /start at 1/],
  ])('refuses %j with an AddressError listing the accepted forms', (text, pattern) => {
    let caught: unknown;
    try {
      parseAddress(text);
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(AddressError);
    expect((caught as AddressError).message).toMatch(pattern);
    expect((caught as AddressError).hint).toMatch(/TCPIP::HOST::5025::SOCKET/);
    expect((caught as AddressError).hint).toMatch(/TCPIP::HOST::INSTR/);
    expect((caught as AddressError).hint).toMatch(/USB0::0xVVVV::0xPPPP::SERIAL::INSTR/);
  });
});
