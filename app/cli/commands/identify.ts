/**
 * `rolloff identify ADDRESS`: connect, print the *IDN? fields, then report and
 * clear the error queue. For a serial address, --bauds tries each speed in turn.
 */
import { ValidationError } from '../../errors';
import { formatAddress, isBaudRate, parseAddress, type InstrumentAddress } from '../../scpi/address';
import { connect } from '../../scpi/connect';
import { ScpiError, ScpiMalformedReplyError, ScpiTimeoutError } from '../../scpi/errors';
import type { ScpiSession } from '../../scpi/session';
import type { InstrumentIdentity } from '../../contract/contract';
import { optionString, requirePositional, type CommandSpec } from '../args';
import { replyTimeoutFrom, replyTimeoutOption } from '../common-options';

export const identifyCommand: CommandSpec = {
  name: 'identify',
  aliases: ['probe'],
  summary: 'Identify an instrument (*IDN?) and report and clear its error queue',
  usage: 'ADDRESS [--bauds 9600,19200,…] [--timeout S]',
  options: [
    { name: 'bauds', kind: 'string', placeholder: 'LIST', description: 'serial only: baud rates to try in order, comma-separated' },
    replyTimeoutOption(),
  ],
  details: `
Addresses: serial:///dev/ttyUSB0?baud=9600&data=8&parity=none&stop=1&flow=none,
tcp://HOST:5025, ASRL/dev/ttyUSB0::INSTR, ASRL3::INSTR, TCPIP::HOST::5025::SOCKET.
Examples:
  rolloff identify tcp://127.0.0.1:5025
  rolloff identify serial:///dev/ttyUSB0 --bauds 9600,19200,115200`,
  async run(parsed) {
    const address = parseAddress(requirePositional(parsed, 0, 'ADDRESS'));
    const timeoutS = replyTimeoutFrom(parsed);
    const candidates = candidateAddresses(address, optionString(parsed, 'bauds'));
    let lastError: unknown;
    for (const candidate of candidates) {
      const session = await connect(candidate, { timeoutS });
      try {
        const identity = await session.identify();
        await report(session, candidate, identity);
        return 0;
      } catch (error) {
        lastError = error;
        // A wrong baud rate shows as silence or gibberish; try the next one.
        const tryNext = candidates.length > 1 && (error instanceof ScpiTimeoutError || error instanceof ScpiMalformedReplyError);
        if (!tryNext) throw error;
        process.stderr.write(`  no answer at ${candidate.kind === 'serial' ? candidate.serial.baudRate : '?'} baud\n`);
      } finally {
        await session.close().catch(() => undefined);
      }
    }
    if (lastError instanceof ScpiError) {
      throw new ScpiError(`no instrument answered *IDN? at any of the baud rates tried (${candidates.map((c) => (c.kind === 'serial' ? c.serial.baudRate : '')).join(', ')})`, 'Check the cable, that the instrument\'s remote interface is set to serial, and its parity/stop-bit settings.');
    }
    throw lastError;
  },
};

function candidateAddresses(address: InstrumentAddress, bauds: string | undefined): InstrumentAddress[] {
  if (bauds === undefined) return [address];
  if (address.kind !== 'serial') throw new ValidationError('--bauds', 'applies only to serial addresses');
  return bauds.split(',').map((text) => {
    const baudRate = Number(text.trim());
    if (!isBaudRate(baudRate)) throw new ValidationError('--bauds', `"${text}" is not a baud rate`);
    return { kind: 'serial', serial: { ...address.serial, baudRate } };
  });
}

async function report(session: ScpiSession, address: InstrumentAddress, identity: InstrumentIdentity): Promise<void> {
  const identityLines = [
    `Address:        ${formatAddress(address)}`,
    `Manufacturer:   ${identity.manufacturer}`,
    `Model:          ${identity.model}`,
    `Serial number:  ${identity.serialNumber}`,
    `Firmware:       ${identity.firmware}`,
  ];
  // The identity is worth showing even if the error queue cannot be read.
  process.stdout.write(`${identityLines.join('\n')}\n`);
  let errors;
  try {
    errors = await session.drainErrors();
  } catch (error) {
    if (!(error instanceof ScpiTimeoutError || error instanceof ScpiMalformedReplyError)) throw error;
    process.stdout.write(`Error queue:    not readable (${error.message})\n`);
    return;
  }
  await session.clearStatus();
  const lines = [
    errors.length === 0 ? 'Error queue:    empty' : `Error queue:    ${errors.length} entr${errors.length === 1 ? 'y' : 'ies'} (now cleared)`,
    ...errors.map((e) => `  ${e.code},"${e.message}"`),
  ];
  process.stdout.write(`${lines.join('\n')}\n`);
}
