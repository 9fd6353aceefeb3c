/**
 * The noise run: the run loop (run-steps.ts) whose steps are records, each
 * stored the moment it is measured (NoiseRecordStore), so a crash loses no
 * record and a resumed run repeats none.
 */
import type { RunStatus } from '../../contract/contract';
import { PointFlag } from '../../contract/contract';
import type { RolloffStore } from '../../store';
import type { NoiseStepResult } from './measure-noise';
import { runSteps, type StepRunOptions } from './run-steps';

export interface NoiseRunOptions extends Omit<StepRunOptions<NoiseStepResult>, 'commit' | 'noun' | 'store' | 'nextExtraSteps'> {
  store: Pick<RolloffStore, 'nextStep' | 'updateRunStatus' | 'appendEvent' | 'loadPoints' | 'insertNoiseRecord'>;
}

export function runNoise(options: NoiseRunOptions): Promise<RunStatus> {
  const { store, runId } = options;
  return runSteps<NoiseStepResult>({
    ...options,
    noun: 'noise run',
    async commit(setting, result, retried, log, asOwner) {
      const { note, ...record } = result;
      await store.insertNoiseRecord(runId, { ...record, step: setting.step, flags: record.flags | (retried ? PointFlag.retried : 0) }, asOwner);
      if (note) await log('info', note);
    },
  });
}
