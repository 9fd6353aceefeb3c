import type { CommandSpec } from '../args';
import { DESIGN_PLACEHOLDER } from '../design-option';
import { optionFlag } from '../args';
import { SAFETY_NOTICE_SHORT } from '../../contract/safety';
import { BENCH_OPTIONS, BUILD_OPTIONS, PLAN_OPTIONS, namedForTheCommandLine, openService, prepareSweep, reportReusedLimit } from '../sweep/sweep-options';
import { followRun } from '../sweep/follow-run';
import { formatDuration } from '../../units';
import { runDetailText } from '../sweep/summary-text';
import { formatEngineering, formatFixed } from '../../units';
import { RUN_JSON_DESCRIPTION, runRecordJson } from '../run-json';
import { BENCH_WORDS } from '../../contract/vocabulary';

export const sweepCommand: CommandSpec = {
  name: 'sweep',
  summary: 'Sweep a build (frequency or DC transfer), store every point, compare with theory',
  usage: `(--build ID | --design ${DESIGN_PLACEHOLDER} [--label TEXT] [--actual PART=VALUE …]) (--simulated | --generator ADDR --scope ADDR|--meter ADDR) [options]`,
  options: [...BUILD_OPTIONS, ...BENCH_OPTIONS, ...PLAN_OPTIONS, { name: 'json', kind: 'flag', description: `print the finished run on stdout as ${RUN_JSON_DESCRIPTION} (as show RUN --json)` }],
  details: `
Examples:
  rolloff sweep --design lowpass.json --label "board A" --simulated --max-stimulus 2
  rolloff sweep --build 3 --generator tcp://192.0.2.10:5025 --scope tcp://192.0.2.11:5025 --max-stimulus 1 --from 10 --to 1meg
  rolloff sweep --build 4 --dc --from 1m --to 10 --per-decade 5 --simulated --max-stimulus 20

The maximum stimulus is a setting of the bench: --max-stimulus saves it for this bench (the
simulated bench and the real instruments of a bench each keep their own), and later sweeps on
the same bench reuse it, saying so. Every point is stored the moment it is measured. Ctrl-C pauses after the current point;
"rolloff resume RUN" continues where it stopped.`,
  async run(parsed) {
    process.stderr.write(`${SAFETY_NOTICE_SHORT}\n\n`);
    const service = await openService(parsed);
    try {
      const interrupted = await service.interruptedRuns();
      if (interrupted.length > 0) {
        process.stderr.write(`Note: run(s) ${interrupted.map((r) => r.id).join(', ')} were left running or paused by an earlier session; ` +
          `continue one with: rolloff resume RUN --db ${service.databaseLocation}\n`);
      }
      const { request } = await prepareSweep(service, parsed);
      reportReusedLimit(service);
      const plan = await service.planSweep(request).catch((error: unknown) => {
        throw namedForTheCommandLine(error);
      });
      process.stderr.write(
        `plan: ${plan.steps.length} points, physical minimum ${formatDuration(plan.estimatedDurationS)} of bench time` +
          `${service.clock.timeScale !== 1 ? ` (simulated bench ×${service.clock.timeScale})` : ''}; maximum stimulus ${service.maxStimulus} Vpp\n`,
      );
      for (const warning of plan.warnings) process.stderr.write(`plan warning: ${warning}\n`);
      if (request.through && !optionFlag(parsed, 'simulated')) {
        process.stderr.write('through-calibration: the meter must read the generator output directly (stage bypassed); the result becomes this bench\'s calibration.\n');
      }
      const run = await service.startRun(request);
      process.stderr.write(`run ${run.id} started on the ${run.simulated ? BENCH_WORDS.simulated : BENCH_WORDS.real}; database ${service.databaseLocation}\n`);
      const status = await followRun(service, run.id).catch((error) => {
        throw error;
      });
      const detail = await service.getRun(run.id);
      if (optionFlag(parsed, 'json')) process.stdout.write(await runRecordJson(service, run.id));
      else process.stdout.write(runDetailText(detail, await service.diodeOfRun(run.id)));
      if (status === 'paused') process.stderr.write(`run ${run.id} paused; continue with: rolloff resume ${run.id} --db ${service.databaseLocation}\n`);
      if (detail.kind === 'ac' && detail.figures.gainLimitHz !== undefined && detail.theoryGainLimitHz !== undefined) {
        const ratio = detail.figures.gainLimitHz / detail.theoryGainLimitHz - 1;
        process.stderr.write(`gain-limit point ${formatEngineering(detail.figures.gainLimitHz, 'Hz')} measured, ${formatFixed(ratio * 100, 1)} % from theory\n`);
      }
      return status === 'done' || status === 'paused' ? 0 : 1;
    } finally {
      await service.close();
    }
  },
};
