/**
 * Driving one run: its sweep on the bench's instruments (sweep/runner), the
 * heartbeat that tells other processes this one still owns it, and its end:
 * released, then finished by its kind (run-kinds.ts; a noise run: noise-run.ts). An owner that lost the
 * run stops at once and stores nothing more.
 */
import type { RolloffStore, RunClaimant } from '../store';
import type { ServiceEvents } from '../contract/contract';
import { runSweep } from '../sweep/runner/run-sweep';
import type { BenchControl } from './bench-control';
import { driveOwnedRun, firstThenReconnect, HEARTBEAT_INTERVAL_MS, type DrivenRun } from './run-ownership';
import { launchNoiseRun, type NoiseRunBench } from './noise-run';
import { finalizeRun, sweepSetupFor, type RunKindContext } from './run-kinds';
import type { RolloffServiceOptions } from './service-options';

/** A run this service drives: its controls and how it ends (its final status, or why it failed). */
export type ActiveRun = DrivenRun;

export interface LaunchContext extends RunKindContext {
  bench: RunKindContext['bench'] & Pick<BenchControl, 'currentInstruments' | 'reconnectAll'>;
  options: RunKindContext['options'] & Pick<RolloffServiceOptions, 'giveUpAfterS' | 'heartbeatIntervalMs'>;
  store: RolloffStore;
  claimant: RunClaimant;
  emit<E extends 'progress' | 'point' | 'runEvent'>(event: E, payload: ServiceEvents[E]): void;
  /** The runs this service drives: the launched run is in it until its sweep ends. */
  active: Map<number, ActiveRun>;
  /** What a noise run borrows from the service (noise-run.ts drives it). */
  noiseBench(): NoiseRunBench;
}

/**
 * Starts a run this service owns; resolves once it is under way (its end: context.active's entry)
 * with the step it starts at: the store's next step, read before the run stores any.
 */
export async function launchRun(context: LaunchContext, runId: number): Promise<number> {
  const { store, claimant, bench, options } = context;
  const run = await store.getRun(runId);
  const firstStep = await store.nextStep(runId);
  if (run.kind === 'noise') {
    launchNoiseRun(context.noiseBench(), run, firstStep);
    return firstStep;
  }
  const setup = await sweepSetupFor(context, run);
  const driven = driveOwnedRun(store, runId, claimant.ownerId, options.heartbeatIntervalMs ?? HEARTBEAT_INTERVAL_MS, (control) =>
    runSweep({
      ...setup,
      store,
      runId,
      firstStep,
      ownerId: claimant.ownerId,
      control,
      giveUpAfterS: options.giveUpAfterS ?? 120,
      emit: (event, payload) => context.emit(event, payload),
      connectInstruments: firstThenReconnect(() => bench.currentInstruments(), () => bench.reconnectAll()),
    }), {
    ended: () => context.active.delete(runId),
    finish: () => finalizeRun(context, runId),
  });
  context.active.set(runId, driven);
  return firstStep;
}
