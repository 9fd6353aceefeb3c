/** `rolloff ports`: the serial ports this machine has, with USB identities where known. */
import { listPorts } from '../../scpi/ports';
import { optionFlag, type CommandSpec } from '../args';

export const portsCommand: CommandSpec = {
  name: 'ports',
  summary: 'List serial ports with USB vendor/product/serial numbers where known',
  usage: '[--json]',
  options: [{ name: 'json', kind: 'flag', description: 'print JSON instead of a table' }],
  details: `
Use a listed path in an address: serial:///dev/ttyUSB0?baud=9600 or ASRL/dev/ttyUSB0::INSTR.
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
      process.stdout.write('No serial ports found. Check the cable and driver, or start a simulated bench with "rolloff sim".\n');
    } else {
      const rows = [['PATH', 'USB VID:PID', 'SERIAL NUMBER', 'MANUFACTURER'], ...ports.map((p) => [p.path, p.vendorId ? `${p.vendorId}:${p.productId ?? '?'}` : '-', p.serialNumber ?? '-', p.manufacturer ?? '-'])];
      const widths = rows[0].map((_, column) => Math.max(...rows.map((row) => row[column].length)));
      for (const row of rows) process.stdout.write(`${row.map((cell, i) => cell.padEnd(widths[i])).join('  ').trimEnd()}\n`);
    }
    if (incomplete) process.stdout.write(`Note: ${incomplete}\n`);
    return 0;
  },
};
