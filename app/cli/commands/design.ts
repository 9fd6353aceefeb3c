import type { CommandSpec } from '../args';
import { optionString, requirePositional } from '../args';
import { ValidationError } from '../../errors';
import { openLocalServiceAt } from '../../service/open-service';
import { resolveDatabasePath } from '../../store';
import { DATABASE_OPTION } from '../common-options';
import { readDesignFile } from '../design-option';

export const designCommand: CommandSpec = {
  name: 'design',
  summary: 'Store a design file, or list the stored designs',
  usage: 'add FILE.json | list  [--db PATH]',
  options: [DATABASE_OPTION],
  details: 'Make a design file with rolloff template, edit its part values, then store it with rolloff design add.',
  async run(parsed) {
    const action = requirePositional(parsed, 0, 'ACTION (add or list)');
    const service = await openLocalServiceAt(resolveDatabasePath(optionString(parsed, 'db')));
    try {
      if (action === 'add') {
        const path = requirePositional(parsed, 1, 'FILE.json');
        const saved = await service.saveDesign(readDesignFile(path, 'FILE.json'));
        process.stdout.write(`design ${saved.id} "${saved.name}" stored\n`);
        return 0;
      }
      if (action === 'list') {
        const designs = await service.listDesigns();
        if (designs.length === 0) process.stdout.write('No designs stored. Add one with: rolloff design add FILE.json\n');
        for (const d of designs) process.stdout.write(`${String(d.id).padEnd(5)} ${d.name.padEnd(40)} ${d.createdAt}\n`);
        return 0;
      }
      throw new ValidationError('ACTION', `"${action}" is not add or list`);
    } finally {
      await service.close();
    }
  },
};
