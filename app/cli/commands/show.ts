import type { CommandSpec } from '../args';
import { optionFlag, optionString, requirePositional } from '../args';
import { formatEngineering, formatPrecision } from '../../units';
import { formatMeasured } from '../../record/record-formatting';
import { ValidationError } from '../../errors';
import { flagWords } from '../../contract/vocabulary';
import { openLocalServiceAt } from '../../service/open-service';
import { resolveDatabasePath } from '../../store';
import { DATABASE_OPTION } from '../common-options';
import { runDetailText, timeText } from '../sweep/summary-text';
import { RUN_JSON_DESCRIPTION, runRecordJson } from '../run-json';
import { noiseRecordTable, noiseRunText } from '../sweep/noise-text';
import type { RunEvent } from '../../contract/contract';

export const showCommand: CommandSpec = {
  name: 'show',
  summary: 'Show one run: figures against theory, verdict, and optionally its points (a noise run: its records) and events',
  usage: 'RUN [--list-points] [--list-events] [--json] [--db PATH]',
  options: [
    // Not --points: on sweep that is how many points a linear sweep has.
    { name: 'list-points', kind: 'flag', description: 'list the measured points with uncertainties and flags (a noise run: its records)' },
    { name: 'list-events', aliases: ['events'], kind: 'flag', description: 'list the run\'s events' },
    { name: 'json', kind: 'flag', description: `print ${RUN_JSON_DESCRIPTION}` },
    DATABASE_OPTION,
  ],
  async run(parsed) {
    const runId = parseRunId(requirePositional(parsed, 0, 'RUN'));
    const service = await openLocalServiceAt(resolveDatabasePath(optionString(parsed, 'db')));
    try {
      if (optionFlag(parsed, 'json')) {
        process.stdout.write(await runRecordJson(service, runId));
        return 0;
      }
      if ((await service.getRunSummary(runId)).kind === 'noise') {
        const noise = await service.getNoiseRun(runId);
        process.stdout.write(noiseRunText(noise));
        if (optionFlag(parsed, 'list-points')) process.stdout.write(`\n${noiseRecordTable(noise)}`);
        if (optionFlag(parsed, 'list-events')) writeEvents(noise.events);
        return 0;
      }
      const detail = await service.getRun(runId);
      process.stdout.write(runDetailText(detail, await service.diodeOfRun(runId)));
      if (optionFlag(parsed, 'list-points')) {
        const p = detail.points;
        process.stdout.write(`\n${'step'.padEnd(5)} ${(detail.kind === 'ac' ? 'frequency' : 'input').padEnd(12)} ${'amplitude'.padEnd(11)} ${(detail.kind === 'ac' ? 'gain ± u' : 'output V').padEnd(26)} ${'phase ± u'.padEnd(20)} flags\n`);
        for (let i = 0; i < p.step.length; i++) {
          const flags = flagWords(p.flags[i]);
          const main = detail.kind === 'ac' ? formatMeasured(p.gainDb[i], p.gainUncertaintyDb[i], 'dB') : formatPrecision(p.outputV[i], 6);
          const phase = Number.isFinite(p.phaseDeg[i]) ? formatMeasured(p.phaseDeg[i], p.phaseUncertaintyDeg[i], '°') : '—';
          process.stdout.write(`${String(p.step[i]).padEnd(5)} ${formatEngineering(p.stimulus[i], detail.kind === 'ac' ? 'Hz' : 'V').padEnd(12)} ${formatEngineering(p.amplitudeVpp[i], 'Vpp').padEnd(11)} ${main.padEnd(26)} ${phase.padEnd(20)} ${flags}\n`);
        }
      }
      if (optionFlag(parsed, 'list-events')) writeEvents(detail.events);
      return 0;
    } finally {
      await service.close();
    }
  },
};

function writeEvents(events: RunEvent[]): void {
  process.stdout.write('\n');
  for (const e of events) process.stdout.write(`${timeText(e.at)}  ${e.level.padEnd(7)}  ${e.message}\n`);
}

export function parseRunId(text: string): number {
  if (!/^\s*\d+\s*$/.test(text) || Number(text) <= 0) throw new ValidationError('RUN', `"${text}" is not a run number`, 'See rolloff runs for the list.');
  return Number(text);
}
