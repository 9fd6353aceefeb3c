import type { CommandSpec } from '../args';
import { optionNumber, optionString, requirePositional } from '../args';
import { ValidationError } from '../../errors';
import { openServiceAt } from '../../service/open-service';
import { resolveDatabasePath } from '../../store';
import { DATABASE_OPTION, actualValuesFrom } from '../sweep/sweep-options';
import { formatEngineering } from '../../units';

export const buildCommand: CommandSpec = {
  name: 'build',
  summary: 'Record a build of a stored design (with its measured part values), or list builds',
  usage: 'add --design ID --label TEXT [--notes TEXT] [--actual PART=VALUE …] | list [--design ID]  [--db PATH]',
  options: [
    { name: 'design', kind: 'integer', placeholder: 'ID', description: 'the stored design (rolloff design list)' },
    { name: 'label', kind: 'string', placeholder: 'TEXT', description: 'label of the build, e.g. "board 3"' },
    { name: 'notes', kind: 'string', placeholder: 'TEXT', description: 'notes', defaultValue: '' },
    { name: 'actual', kind: 'string', placeholder: 'PART=VALUE', repeatable: true, description: 'measured part value, e.g. C1=16.2n (SI units, engineering notation)' },
    DATABASE_OPTION,
  ],
  async run(parsed) {
    const action = requirePositional(parsed, 0, 'ACTION (add or list)');
    const service = await openServiceAt(resolveDatabasePath(optionString(parsed, 'db')));
    try {
      if (action === 'add') {
        const designId = optionNumber(parsed, 'design');
        const label = optionString(parsed, 'label');
        if (designId === undefined) throw new ValidationError('--design', 'is missing', 'See rolloff design list for the ids.');
        if (!label) throw new ValidationError('--label', 'is missing', 'Give the build a label, e.g. --label "board 3".');
        const build = await service.createBuild({ designId, label, notes: optionString(parsed, 'notes') ?? '', actualValues: actualValuesFrom(parsed) });
        process.stdout.write(`build ${build.id} "${build.label}" of design ${build.designId} stored\n`);
        return 0;
      }
      if (action === 'list') {
        const builds = await service.listBuilds(optionNumber(parsed, 'design'));
        if (builds.length === 0) process.stdout.write('No builds stored.\n');
        for (const b of builds) {
          const values = Object.entries(b.actualValues).map(([id, v]) => `${id}=${formatEngineering(v)}`).join(' ');
          process.stdout.write(`${String(b.id).padEnd(5)} design ${String(b.designId).padEnd(4)} ${b.label.padEnd(24)} ${values}\n`);
        }
        return 0;
      }
      throw new ValidationError('ACTION', `"${action}" is not add or list`);
    } finally {
      await service.close();
    }
  },
};
