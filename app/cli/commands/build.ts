import type { CommandSpec } from '../args';
import { optionString, requirePositional } from '../args';
import { ValidationError } from '../../errors';
import { openLocalServiceAt } from '../../service/open-service';
import { resolveDatabasePath } from '../../store';
import { actualValuesFrom } from '../sweep/sweep-options';
import { DATABASE_OPTION } from '../common-options';
import { chooseDesign, designOption, DESIGN_PLACEHOLDER, matchingDesignIds, storedDesignId } from '../design-option';
import { formatEngineering } from '../../units';
import { parseDesign, withActualValues } from '../../circuit';

export const buildCommand: CommandSpec = {
  name: 'build',
  summary: 'Record a build of a stored design (with its measured part values), or list builds',
  usage: `add --design ${DESIGN_PLACEHOLDER} --label TEXT [--notes TEXT] [--actual PART=VALUE …] | list [--design ${DESIGN_PLACEHOLDER}]  [--db PATH]`,
  options: [
    designOption('add: the design of the build (a file is stored first); list: only its builds'),
    { name: 'label', kind: 'string', placeholder: 'TEXT', description: 'label of the build, e.g. "board 3"' },
    { name: 'notes', kind: 'string', placeholder: 'TEXT', description: 'notes', defaultValue: '' },
    { name: 'actual', kind: 'string', placeholder: 'PART=VALUE', repeatable: true, description: 'measured part value, e.g. C1=16.2n (SI units, engineering notation)' },
    DATABASE_OPTION,
  ],
  async run(parsed) {
    const action = requirePositional(parsed, 0, 'ACTION (add or list)');
    const service = await openLocalServiceAt(resolveDatabasePath(optionString(parsed, 'db')));
    try {
      if (action === 'add') {
        const designText = optionString(parsed, 'design');
        const label = optionString(parsed, 'label');
        if (designText === undefined) throw new ValidationError('--design', 'is missing', 'Give a stored design\'s id (rolloff design list) or a design file.');
        if (!label) throw new ValidationError('--label', 'is missing', 'Give the build a label, e.g. --label "board 3".');
        const design = chooseDesign(designText);
        const actualValues = actualValuesFrom(parsed);
        // A design file and its measured values are checked before the design is stored, so a refused build stores nothing.
        if ('content' in design) withActualValues(parseDesign(design.content, design.path), actualValues);
        const build = await service.createBuild({ designId: await storedDesignId(service, design), label, notes: optionString(parsed, 'notes') ?? '', actualValues });
        process.stdout.write(`build ${build.id} "${build.label}" of design ${build.designId} stored\n`);
        return 0;
      }
      if (action === 'list') {
        const designText = optionString(parsed, 'design');
        const designIds = designText === undefined ? [undefined] : await matchingDesignIds(service, chooseDesign(designText));
        const builds = (await Promise.all(designIds.map((id) => service.listBuilds(id)))).flat();
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
