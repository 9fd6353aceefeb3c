import type { CommandSpec } from '../args';
import { DESIGN_PLACEHOLDER } from '../design-option';
import { optionNumber, optionString } from '../args';
import { ValidationError } from '../../errors';
import { SAFETY_NOTICE_SHORT } from '../../contract/safety';
import { BENCH_OPTIONS, BUILD_OPTIONS, PLAN_OPTIONS, openService, prepareSweep, reportReusedLimit } from '../sweep/sweep-options';
import { followRun } from '../sweep/follow-run';
import { formatEngineering, formatFixed } from '../../units';

export const scheduleCommand: CommandSpec = {
  name: 'schedule',
  summary: 'Repeat a sweep of one build every M minutes, N times or until a time, and report the drift',
  usage: `(--build ID | --design ${DESIGN_PLACEHOLDER} …) --every MIN (--count N | --until TIME) (--simulated | --generator ADDR …) [plan options]`,
  options: [
    { name: 'every', kind: 'number', placeholder: 'MIN', description: 'minutes from the start of one run to the start of the next' },
    { name: 'count', kind: 'integer', placeholder: 'N', description: 'number of runs' },
    { name: 'until', kind: 'string', placeholder: 'TIME', description: 'no run starts after this time: HH:MM (next occurrence) or ISO 8601' },
    ...BUILD_OPTIONS, ...BENCH_OPTIONS, ...PLAN_OPTIONS,
  ],
  details: `
Each repetition is an ordinary run of the same build (see rolloff runs). An overnight schedule leaves the
circuit powered and unattended: do this only where your lab's rules allow it. Ctrl-C pauses the current run
and ends the schedule.`,
  async run(parsed) {
    process.stderr.write(`${SAFETY_NOTICE_SHORT}\n\n`);
    const everyMinutes = optionNumber(parsed, 'every');
    if (everyMinutes === undefined) throw new ValidationError('--every', 'is missing', 'Give the interval in minutes, e.g. --every 30.');
    const until = untilTime(optionString(parsed, 'until'));
    const service = await openService(parsed);
    try {
      const { buildId, request } = await prepareSweep(service, parsed);
      reportReusedLimit(service);
      const report = await service.runSchedule({ request, everyMinutes, count: optionNumber(parsed, 'count'), until }, (run, index) => {
        process.stderr.write(`schedule: run ${index + 1} is run ${run.id}\n`);
        void followRun(service, run.id);
      });
      const out = (line: string) => process.stdout.write(line + '\n');
      out(`schedule ${report.scheduleId}: ${report.runs.length} run(s) of build ${buildId}: ${report.runs.map((r) => `${r.runId} (${r.status})`).join(', ')}`);
      out('drift (first → last, spread):');
      for (const row of report.drift) {
        if (row.first === undefined) continue;
        const show = (v: number) => (row.unit === 'Hz' ? formatEngineering(v, 'Hz') : `${formatFixed(v, 3)} ${row.unit}`);
        out(`  ${row.figure.padEnd(20)} ${show(row.first)} → ${show(row.last!)}   change ${show(row.change!)}, spread ${show(row.spread!)}`);
      }
      return report.runs.every((r) => r.status === 'done') ? 0 : 1;
    } finally {
      await service.close();
    }
  },
};

/** "07:30" → the next 07:30 local time; ISO 8601 passes through. */
function untilTime(text: string | undefined): string | undefined {
  if (text === undefined) return undefined;
  const clock = /^(\d{1,2}):(\d{2})$/.exec(text.trim());
  if (!clock) {
    if (Number.isNaN(Date.parse(text))) throw new ValidationError('--until', `"${text}" is not a time`, 'Use HH:MM or an ISO 8601 date and time.');
    return text;
  }
  const [hours, minutes] = [Number(clock[1]), Number(clock[2])];
  if (hours > 23 || minutes > 59) throw new ValidationError('--until', `"${text}" is not a time of day`);
  const at = new Date();
  at.setHours(hours, minutes, 0, 0);
  if (at.getTime() <= Date.now()) at.setDate(at.getDate() + 1);
  return at.toISOString();
}
