/** `rolloff ports`: the serial ports this machine has, with USB identities where known. */
import { listSerialPorts } from '../../scpi/list-ports';
import { optionFlag, type CommandSpec } from '../args';

export const portsCommand: CommandSpec = {
  name: 'ports',
  summary: 'List serial ports with USB vendor/product/serial numbers where known',
  usage: '[--json]',
  options: [{ name: 'json', kind: 'flag', description: 'print JSON instead of a table' }],
  details: `
Use a listed path in an address: serial:///dev/ttyUSB0?baud=9600 or ASRL/dev/ttyUSB0::INSTR.
Pseudo-terminals made by "rolloff sim --pty DIR" are not listed; use the address sim prints.`,
  async run(parsed) {
    const ports = await listSerialPorts();
    if (optionFlag(parsed, 'json')) {
      process.stdout.write(`${JSON.stringify(ports, null, 2)}\n`);
      return 0;
    }
    if (ports.length === 0) {
      process.stdout.write('No serial ports found. Check the cable and driver, or start a simulated bench with "rolloff sim".\n');
      return 0;
    }
    const rows = [['PATH', 'USB VID:PID', 'SERIAL NUMBER', 'MANUFACTURER'], ...ports.map((p) => [p.path, p.vendorId ? `${p.vendorId}:${p.productId ?? '?'}` : '-', p.serialNumber ?? '-', p.manufacturer ?? '-'])];
    const widths = rows[0].map((_, column) => Math.max(...rows.map((row) => row[column].length)));
    for (const row of rows) process.stdout.write(`${row.map((cell, i) => cell.padEnd(widths[i])).join('  ').trimEnd()}\n`);
    return 0;
  },
};
