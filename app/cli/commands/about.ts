import type { CommandSpec } from '../args';
import { SAFETY_NOTICE_POINTS } from '../../contract/safety';
import { SOFTWARE_VERSION } from '../../contract/version';

export const aboutCommand: CommandSpec = {
  name: 'about',
  summary: 'Version and the safety cautions that apply to every bench session',
  usage: '',
  options: [],
  async run() {
    const lines = [`Rolloff ${SOFTWARE_VERSION}`, '', 'Before you sweep:', ...SAFETY_NOTICE_POINTS.map((p) => `  • ${p}`)];
    process.stdout.write(lines.join('\n') + '\n');
    return 0;
  },
};
