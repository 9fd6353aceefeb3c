/**
 * The command table. Each command lives in its own file beside this one;
 * add one import and one entry per command.
 */
import type { CommandSpec } from '../args';
import { serveCommand } from './serve';
import { aboutCommand } from './about';
import { theoryCommand } from './theory';
import { templateCommand } from './template';
import { sweepCommand } from './sweep';
import { runsCommand } from './runs';
import { showCommand } from './show';
import { resumeCommand } from './resume';
import { demoCommand } from './demo';
import { scheduleCommand } from './schedule';
import { designCommand } from './design';
import { buildCommand } from './build';
import { portsCommand } from './ports';
import { probeCommand } from './probe';
import { queryCommand } from './query';
import { simCommand } from './sim';
import { exportCommand } from './export';

export const COMMANDS: CommandSpec[] = [
  serveCommand,
  aboutCommand,
  theoryCommand,
  templateCommand,
  sweepCommand,
  runsCommand,
  showCommand,
  resumeCommand,
  demoCommand,
  scheduleCommand,
  designCommand,
  buildCommand,
  portsCommand,
  probeCommand,
  queryCommand,
  simCommand,
  exportCommand,
];
