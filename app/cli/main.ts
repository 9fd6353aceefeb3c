/**
 * `rolloff` command dispatcher. User errors print a message and a hint with no
 * stack trace and exit 2; unexpected errors keep their stack and exit 1.
 */
import { isUserError } from '../errors';
import { findCommand, formatCommandHelp, parseArgs, type CommandSpec } from './args';
import { COMMANDS } from './commands';
import { SAFETY_NOTICE_SHORT } from '../contract/safety';

const EXIT_USER_ERROR = 2;
const EXIT_BUG = 1;

function overallHelp(): string {
  const width = Math.max(...COMMANDS.map((c) => c.name.length)) + 2;
  const lines = [
    'rolloff — bench companion for characterising op-amp stages',
    '',
    'Usage: rolloff COMMAND [arguments] [options]   (rolloff COMMAND --help for details)',
    '',
    'Commands:',
    ...COMMANDS.map((c) => `  ${c.name.padEnd(width)}${c.summary}`),
    '',
    SAFETY_NOTICE_SHORT,
  ];
  return lines.join('\n') + '\n';
}

export async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (name === undefined || name === '--help' || name === '-h' || name === 'help') {
    const topic = name === 'help' ? findCommand(COMMANDS, rest[0]) : undefined;
    process.stdout.write(topic ? formatCommandHelp(topic) : overallHelp());
    return 0;
  }
  if (name === '--version') {
    process.stdout.write(`${await softwareVersion()}\n`);
    return 0;
  }
  const command: CommandSpec | undefined = findCommand(COMMANDS, name);
  if (!command) {
    process.stderr.write(`rolloff: unknown command "${name}".\nRun "rolloff --help" for the list of commands.\n`);
    return EXIT_USER_ERROR;
  }
  if (rest.includes('--help') || rest.includes('-h')) {
    process.stdout.write(formatCommandHelp(command));
    return 0;
  }
  try {
    return await command.run(parseArgs(rest, command.options));
  } catch (error) {
    if (isUserError(error)) {
      process.stderr.write(`rolloff ${command.name}: ${error.message}\n`);
      if (error.hint) process.stderr.write(`  ${error.hint}\n`);
      return EXIT_USER_ERROR;
    }
    process.stderr.write(`rolloff ${command.name}: internal error — please report it with the command you ran.\n`);
    process.stderr.write(`${(error as Error)?.stack ?? String(error)}\n`);
    return EXIT_BUG;
  }
}

async function softwareVersion(): Promise<string> {
  const { SOFTWARE_VERSION } = await import('../contract/version');
  return SOFTWARE_VERSION;
}
