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
import { noiseCommand } from './noise';
import { runsCommand } from './runs';
import { showCommand } from './show';
import { resumeCommand } from './resume';
import { demoCommand } from './demo';
import { scheduleCommand } from './schedule';
import { designCommand } from './design';
import { buildCommand } from './build';
import { portsCommand } from './ports';
import { identifyCommand } from './identify';
import { queryCommand } from './query';
import { simCommand } from './sim';
import { exportCommand } from './export';
import { profileCommand } from './profile';
import { storeCommand } from './store';

// Listed in the order of a bench session: try the demo, compute what the
// design should do, find the instruments, sweep, look back, file the record.
export const COMMANDS: CommandSpec[] = [
  demoCommand,
  theoryCommand,
  templateCommand,
  designCommand,
  buildCommand,
  portsCommand,
  identifyCommand,
  profileCommand,
  queryCommand,
  simCommand,
  sweepCommand,
  noiseCommand,
  scheduleCommand,
  resumeCommand,
  runsCommand,
  showCommand,
  exportCommand,
  storeCommand,
  serveCommand,
  aboutCommand,
];
