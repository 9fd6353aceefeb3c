/**
 * `rolloff store copy --from-db DB --to-db DB [--skip-existing]`: a bench's history
 * into the lab store and back out (app/store/copy/copy-history.ts does the work).
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { ValidationError } from '../../errors';
import { STALE_AFTER_MS } from '../../service/run-ownership';
import { databaseUrlScheme, defaultDatabasePath, openStore, type RolloffStore } from '../../store';
import { copyHistory, type CopyReport } from '../../store/copy/copy-history';
import { optionFlag, optionString, requirePositional, type CommandSpec } from '../args';

export const storeCommand: CommandSpec = {
  name: 'store',
  summary: 'Copy a store\'s history into another: a bench\'s SQLite file into the lab store, or back out',
  usage: 'copy --from-db PATH|URL --to-db PATH|URL [--skip-existing]',
  options: [
    // --from-db, not --from: elsewhere --from is where a sweep starts; the stores are named as --db names one.
    { name: 'from-db', kind: 'string', placeholder: 'PATH|URL', description: 'copy: the store to read (a SQLite file or postgres://…); nothing in it is changed, but an older one is first brought to the current schema' },
    { name: 'to-db', kind: 'string', placeholder: 'PATH|URL', description: 'copy: the store to add to (a new SQLite file is created)' },
    { name: 'skip-existing', kind: 'flag', description: 'copy: leave runs the target already holds as they are there and copy the others (default: refuse)' },
  ],
  details: `
copy moves every design, build and run (points with their raw readings, events, figures, times,
offline periods) into the other store. Rows get that store's ids; each keeps its stable id (uid),
so an exported record of a copied run has the same digest as before. A design or build already
there (same uid) is used, not doubled. If the target already holds some of the runs, nothing is
copied unless --skip-existing is given; a copy cut short is finished by running it again with
--skip-existing. Runs being measured right now are refused.
Examples:
  rolloff store copy --from-db ~/.local/share/rolloff/rolloff.sqlite --to-db postgres://bench3@labserver:5432/lab
  rolloff store copy --from-db postgres://bench3@labserver:5432/lab --to-db ./lab-copy.sqlite`,
  async run(parsed) {
    const action = requirePositional(parsed, 0, 'ACTION (copy)');
    if (action !== 'copy') throw new ValidationError('ACTION', `"${action}" is not copy`, 'rolloff store copy --from-db PATH|URL --to-db PATH|URL');
    const from = requiredOption(parsed, 'from-db');
    const to = requiredOption(parsed, 'to-db');
    if (from === to) throw new ValidationError('--to-db', 'is the same store as --from-db', 'Give two different stores.');
    // Opening a missing file would make an empty store and copy nothing: say so instead.
    const fromFile = databaseUrlScheme(from) === undefined ? (/^file:\/\//i.test(from) ? fileURLToPath(from) : from.replace(/^file:/i, '')) : undefined;
    if (fromFile !== undefined && !existsSync(fromFile)) throw new ValidationError('--from-db', `no database at ${fromFile}`, `Give the path of the bench's .sqlite file (the default one is ${defaultDatabasePath()}).`);
    const source = await openStore(from);
    let target: RolloffStore | undefined;
    try {
      target = await openStore(to);
      const report = await copyHistory(source, target, {
        skipExisting: optionFlag(parsed, 'skip-existing'),
        staleAfterMs: STALE_AFTER_MS,
        onProgress: (copied, total) => process.stderr.write(`\r${copied} of ${total} runs copied`),
      });
      if (report.copiedRuns > 0) process.stderr.write('\n');
      process.stdout.write(copyReportText(report, source.location, target.location));
      return 0;
    } finally {
      await target?.close();
      await source.close();
    }
  },
};

function requiredOption(parsed: Parameters<CommandSpec['run']>[0], name: string): string {
  const value = optionString(parsed, name);
  if (!value) throw new ValidationError(`--${name}`, 'is required', 'rolloff store copy --from-db PATH|URL --to-db PATH|URL');
  return value;
}

/** What was copied, what was already there, and which target run each copied run became. */
export function copyReportText(report: CopyReport, from: string, to: string): string {
  const lines = [
    `copied ${report.copiedRuns} run(s) with ${report.copiedPoints.toLocaleString('en')} point(s) from ${from} to ${to}`,
    `designs: ${report.designs.copied} copied, ${report.designs.alreadyThere} already there; builds: ${report.builds.copied} copied, ${report.builds.alreadyThere} already there`,
  ];
  if (report.skippedRuns.length > 0) {
    lines.push(`skipped ${report.skippedRuns.length} run(s) already there: ${report.skippedRuns.map((run) => `run ${run.sourceId} (there as run ${run.targetId})`).join(', ')}`);
  }
  const mapped = [...report.runIds];
  if (mapped.length > 0) lines.push(`run ids there: ${mapped.slice(0, 20).map(([a, b]) => `${a} → ${b}`).join(', ')}${mapped.length > 20 ? `, … (${mapped.length - 20} more)` : ''}`);
  return `${lines.join('\n')}\n`;
}
