import { runStateText } from '../../contract/run-owner-text';
import type { CommandSpec } from '../args';
import { optionFlag, optionNumber, optionString } from '../args';
import { ValidationError } from '../../errors';
import { RUN_STATUSES as STATUSES, type RunStatus } from '../../contract/contract';
import { checkBenchName } from '../../bench/bench-name';
import { openLocalServiceAt } from '../../service/open-service';
import { resolveDatabasePath } from '../../store';
import { DATABASE_OPTION } from '../common-options';
import { runTable } from '../sweep/summary-text';


export const runsCommand: CommandSpec = {
  name: 'runs',
  summary: 'List stored runs, newest first; runs interrupted by a crash are offered for resume',
  usage: '[--search TEXT] [--status STATUS] [--build ID] [--bench NAME] [--db PATH]',
  options: [
    { name: 'search', kind: 'string', placeholder: 'TEXT', description: 'match build label, design name or notes' },
    { name: 'status', kind: 'string', placeholder: 'STATUS', description: `only runs with this status (${STATUSES.join(', ')})` },
    { name: 'build', kind: 'integer', placeholder: 'ID', description: 'only runs of this build' },
    { name: 'bench', kind: 'string', placeholder: 'NAME', description: 'only runs of this bench (its exact name, as the runs table shows it)' },
    { name: 'json', kind: 'flag', description: 'print as JSON' },
    DATABASE_OPTION,
  ],
  async run(parsed) {
    const status = optionString(parsed, 'status');
    if (status !== undefined && !STATUSES.includes(status as RunStatus)) throw new ValidationError('--status', `"${status}" is not a run status`, `Use one of: ${STATUSES.join(', ')}.`);
    const benchOption = optionString(parsed, 'bench');
    const bench = benchOption === undefined ? undefined : checkBenchName(benchOption, '--bench');
    const service = await openLocalServiceAt(resolveDatabasePath(optionString(parsed, 'db')));
    try {
      const runs = await service.listRuns({ search: optionString(parsed, 'search'), status: status as RunStatus | undefined, buildId: optionNumber(parsed, 'build'), bench });
      if (optionFlag(parsed, 'json')) {
        process.stdout.write(JSON.stringify(runs) + '\n');
        return 0;
      }
      process.stdout.write(runTable(runs));
      // Who drives each live run, and which running ones nobody drives any more.
      for (const run of runs) {
        const state = runStateText(run);
        if (state) process.stdout.write(`run ${run.id}: ${state}\n`);
      }
      const interrupted = await service.interruptedRuns();
      if (interrupted.length > 0) {
        process.stderr.write(`\n${interrupted.length} run(s) were left running or paused: ${interrupted.map((r) => r.id).join(', ')}.\n`);
        // The store's own location: a lab store's address without its password (given again by PGPASSWORD or a password file).
        process.stderr.write(`Continue one with: rolloff resume RUN${optionString(parsed, 'db') ? ` --db ${service.databaseLocation}` : ''}\n`);
      }
      return 0;
    } finally {
      await service.close();
    }
  },
};
