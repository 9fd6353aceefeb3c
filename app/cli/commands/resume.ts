import type { CommandSpec } from '../args';
import { optionFlag, optionString, requirePositional } from '../args';
import { ValidationError } from '../../errors';
import { SAFETY_NOTICE_SHORT } from '../../contract/safety';
import { BENCH_OPTIONS, connectRequestsFrom, openService, reportReusedLimit } from '../sweep/sweep-options';
import { followRun } from '../sweep/follow-run';
import { runText } from '../sweep/run-text';
import { parseRunId } from './show';

export const resumeCommand: CommandSpec = {
  name: 'resume',
  summary: 'Continue a paused, interrupted or failed run at its next step (no point lost or repeated)',
  usage: 'RUN [--db PATH] [--max-stimulus VPP] [--generator ADDR …] [--take-over-from BENCH]',
  // The options sweep took for the same bench, --simulated included, so the command that started a run also resumes it.
  options: [
    ...BENCH_OPTIONS,
    { name: 'take-over-from', kind: 'string', placeholder: 'BENCH', description: 'continue a run of another bench here: repeat the name of the bench the run belongs to, as confirmation' },
  ],
  details: `
A simulated run continues on a fresh simulated bench of its build (--simulated may be given, as
with sweep, and changes nothing; give the simulated bench's --circuit-noise and --measurement-noise
as the run was started with, e.g. --circuit-noise --measurement-noise 0 for a noise run); a real run
never continues on the simulated bench. A real run reconnects to the
addresses it was measured with, unless other addresses are given. The maximum stimulus is the one
saved for the run's bench (the simulated bench, or the real instruments, of the bench named with
the run), never one recorded with the run or another bench's; --max-stimulus saves a new one for
that bench. Without either, resume is refused.

A run belongs to the bench it was started on (--bench, ROLLOFF_BENCH or the host name); only that
bench resumes it. To continue another bench's run here (its machine is gone, its process silent),
repeat that bench's name: --take-over-from NAME. A wrong name is refused, naming the right one; the
run's events record the take-over.`,
  async run(parsed) {
    process.stderr.write(`${SAFETY_NOTICE_SHORT}\n\n`);
    const runId = parseRunId(requirePositional(parsed, 0, 'RUN'));
    // The run's bench decides which maximum stimulus applies, not the options.
    const service = await openService(parsed, { benchFromOptions: false });
    try {
      const stored = await service.getRunSummary(runId);
      if (optionFlag(parsed, 'simulated') && !stored.simulated) {
        throw new ValidationError('--simulated', `run ${runId} was measured on real instruments and continues only on them`, 'Drop --simulated; give the instrument addresses if they changed (--generator, --scope, --meter).');
      }
      if (stored.simulated) process.stderr.write(`run ${runId} was measured on the simulated bench and continues on a fresh simulated bench\n`);
      // The step as the sweep took it: read afterwards, the store may already hold the resumed sweep's first points.
      const { continuesAtStep } = await service.resumeRunWith(runId, { instruments: stored.simulated ? [] : connectRequestsFrom(parsed), takeOverFromBench: optionString(parsed, 'take-over-from') });
      reportReusedLimit(service);
      process.stderr.write(`run ${runId} continues at step ${continuesAtStep}\n`);
      const status = await followRun(service, runId);
      process.stdout.write(await runText(service, runId));
      return status === 'done' || status === 'paused' ? 0 : 1;
    } finally {
      await service.close();
    }
  },
};
