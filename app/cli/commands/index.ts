/**
 * The command table. Each command lives in its own file beside this one;
 * add one import and one entry per command.
 */
import type { CommandSpec } from '../args';
import { aboutCommand } from './about';
import { theoryCommand } from './theory';
import { templateCommand } from './template';

export const COMMANDS: CommandSpec[] = [
  aboutCommand,
  theoryCommand,
  templateCommand,
];
