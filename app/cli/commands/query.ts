/**
 * `rolloff query ADDRESS COMMAND…`: a raw SCPI console. Sends each command in
 * order, prints every reply, then the instrument's queued errors.
 */
import { ValidationError } from '../../errors';
import { isQuery } from '../../bench/template';
import { connect } from '../../scpi/connect';
import { ScpiTimeoutError } from '../../scpi/errors';
import { preview } from '../../scpi/reply-framer';
import { requirePositional, type CommandSpec } from '../args';
import { replyTimeoutFrom, replyTimeoutOption } from '../common-options';

/** Exit status when the instrument queued errors (distinct from a usage error). */
export const EXIT_INSTRUMENT_ERRORS = 3;

export const queryCommand: CommandSpec = {
  name: 'query',
  summary: 'Send raw SCPI commands, print the replies and any queued errors',
  usage: 'ADDRESS COMMAND… [--timeout S]',
  options: [replyTimeoutOption()],
  details: `
A command whose header ends in "?" is a query and its reply is printed; binary
block replies are shown as their length and first bytes. After the last
command the error queue is read (SYSTem:ERRor?) and printed; the exit status
is ${EXIT_INSTRUMENT_ERRORS} if the instrument reported errors.
Quote commands that contain spaces or semicolons:
  rolloff query tcp://127.0.0.1:5025 "*IDN?" "SOUR:FREQ 1000" "SOUR:FREQ?"`,
  async run(parsed) {
    const address = requirePositional(parsed, 0, 'ADDRESS');
    const commands = parsed.positionals.slice(1);
    if (commands.length === 0) throw new ValidationError('COMMAND', 'is missing', 'Give at least one SCPI command after the address.');
    const timeoutS = replyTimeoutFrom(parsed);
    const session = await connect(address, { timeoutS });
    try {
      for (const command of commands) {
        // "FREQ 1k;FREQ?" has a reply too: isQuery looks at every unit of the message.
        if (!isQuery(command)) {
          await session.write(command);
          process.stdout.write(`> ${command}\n`);
          continue;
        }
        try {
          const reply = await session.queryRaw(command);
          const shown = reply.kind === 'text' ? reply.text : `<block of ${reply.bytes.length} bytes> ${preview(reply.bytes.subarray(0, 32))}${reply.bytes.length > 32 ? '…' : ''}`;
          process.stdout.write(`> ${command}\n${shown}\n`);
        } catch (error) {
          // A query the instrument did not understand gets no reply; the error queue below says why.
          if (!(error instanceof ScpiTimeoutError)) throw error;
          process.stdout.write(`> ${command}\n(no reply within ${timeoutS} s)\n`);
        }
      }
      const errors = await session.drainErrors();
      if (errors.length === 0) {
        process.stdout.write('Error queue: empty\n');
        return 0;
      }
      process.stdout.write(`Error queue: ${errors.length} entr${errors.length === 1 ? 'y' : 'ies'}\n`);
      for (const e of errors) process.stdout.write(`  ${e.code},"${e.message}"\n`);
      return EXIT_INSTRUMENT_ERRORS;
    } finally {
      await session.close().catch(() => undefined);
    }
  },
};
