/** `rolloff ports`: the serial ports and USBTMC instruments this machine has, with USB identities and the address to use. */
import { listPorts } from '../../scpi/ports';
import { optionFlag, type CommandSpec } from '../args';

export const portsCommand: CommandSpec = {
  name: 'ports',
  summary: 'List serial ports and USBTMC instruments, with USB vendor/product/serial numbers and the address to use',
  usage: '[--json]',
  options: [{ name: 'json', kind: 'flag', description: 'print JSON instead of a table' }],
  details: `
The ADDRESS column is what to connect with (ASRL/dev/ttyUSB0::INSTR for a serial port, at 9600 8N1
unless you add settings: serial:///dev/ttyUSB0?baud=115200; USB0::0xVVVV::0xPPPP::SERIAL::INSTR for a
USBTMC instrument, found again by its USB identity whatever /dev/usbtmcN it gets).
Pseudo-terminals made by "rolloff sim --pty DIR" are not listed; use the address sim prints.
Without udev (minimal installs, containers) the ports are read from the kernel's /sys/class/tty,
and a last line says what could not be learned.`,
  async run(parsed) {
    const { ports, incomplete } = await listPorts();
    if (optionFlag(parsed, 'json')) {
      process.stdout.write(`${JSON.stringify({ ports, ...(incomplete ? { incomplete } : {}) }, null, 2)}\n`);
      return 0;
    }
    if (ports.length === 0) {
      process.stdout.write('No serial ports or USBTMC instruments found. Check the cable and driver, or start a simulated bench with "rolloff sim".\n');
    } else {
      const rows = [
        ['PATH', 'USB VID:PID', 'SERIAL NUMBER', 'MANUFACTURER', 'ADDRESS'],
        ...ports.map((p) => [p.path, p.vendorId ? `${p.vendorId}:${p.productId ?? '?'}` : '—', p.serialNumber ?? '—', p.manufacturer ?? '—', p.address ?? p.path]),
      ];
      const widths = rows[0].map((_, column) => Math.max(...rows.map((row) => row[column].length)));
      for (const row of rows) process.stdout.write(`${row.map((cell, i) => cell.padEnd(widths[i])).join('  ').trimEnd()}\n`);
    }
    if (incomplete) process.stdout.write(`Note: ${incomplete}\n`);
    return 0;
  },
};
