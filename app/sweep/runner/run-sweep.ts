/**
 * The sweep: the run loop (run-steps.ts) whose steps are points — set, settle,
 * measure, store each point the moment it is measured, and announce it.
 */
import { PointFlag } from '../../contract/contract';
import type { ServiceEvents, RunStatus } from '../../contract/contract';
import type { SweepStore } from '../../store';
import { runSteps, type StepRunOptions } from './run-steps';
import type { StepResult } from './types';

export interface SweepRunOptions extends Omit<StepRunOptions<StepResult>, 'commit' | 'noun' | 'store' | 'emit'> {
  /** Only the few store methods a sweep uses: a fake of them drives the runner in tests. */
  store: SweepStore;
  emit<E extends 'progress' | 'point' | 'runEvent'>(event: E, payload: ServiceEvents[E]): void;
}

export function runSweep(options: SweepRunOptions): Promise<RunStatus> {
  const { store, runId } = options;
  return runSteps<StepResult>({
    ...options,
    noun: 'sweep',
    async commit(setting, result, retried, log, asOwner) {
      const flags = result.flags | (retried ? PointFlag.retried : 0) | (setting.refinement ? PointFlag.refinement : 0);
      await store.insertPoint(runId, {
        step: setting.step,
        stimulus: setting.stimulus,
        amplitudeVpp: setting.amplitudeVpp,
        inputReading: result.inputReading,
        outputReading: result.outputReading,
        gainDb: result.gainDb,
        gainUncertaintyDb: result.gainUncertaintyDb,
        phaseDeg: result.phaseDeg,
        phaseUncertaintyDeg: result.phaseUncertaintyDeg,
        outputV: result.outputV,
        flags,
      }, asOwner);
      if (result.advice) await log('warning', result.advice);
      if (result.note) await log('info', result.note);
      options.emit('point', {
        runId, index: setting.step, stimulus: setting.stimulus, gainDb: result.gainDb, phaseDeg: result.phaseDeg,
        outputV: result.outputV, flags, gainUncertaintyDb: result.gainUncertaintyDb, phaseUncertaintyDeg: result.phaseUncertaintyDeg,
      });
    },
  });
}
