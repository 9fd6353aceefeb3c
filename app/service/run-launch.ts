/**
 * Driving one run: its sweep on the bench's instruments (sweep/runner), the
 * heartbeat that tells other processes this one still owns it, and its end:
 * released, then finished by its kind (run-kinds.ts). An owner that lost the
 * run stops at once and stores nothing more.
 */
import { RunTakenOverError, type RolloffStore, type RunClaimant } from '../store';
import type { RunStatus, ServiceEvents } from '../contract/contract';
import { RunControl } from '../sweep/runner/control';
import { runSweep } from '../sweep/runner/run-sweep';
import type { BenchControl } from './bench-control';
import { HEARTBEAT_INTERVAL_MS } from './run-ownership';
import { finalizeRun, sweepSetupFor, type RunKindContext } from './run-kinds';
import type { RolloffServiceOptions } from './service-options';

/** A run this service drives: its controls and how it ends (its final status, or why it failed). */
export interface ActiveRun {
  control: RunControl;
  finished: Promise<RunStatus>;
}

export interface LaunchContext extends RunKindContext {
  bench: RunKindContext['bench'] & Pick<BenchControl, 'currentInstruments' | 'reconnectAll'>;
  options: RunKindContext['options'] & Pick<RolloffServiceOptions, 'giveUpAfterS' | 'heartbeatIntervalMs'>;
  store: RolloffStore;
  claimant: RunClaimant;
  emit<E extends 'progress' | 'point' | 'runEvent'>(event: E, payload: ServiceEvents[E]): void;
  /** The runs this service drives: the launched run is in it until its sweep ends. */
  active: Map<number, ActiveRun>;
}

/**
 * Starts sweeping a run this service owns; resolves once it is under way (its end: context.active's entry)
 * with the step it starts at: the store's next step, read before the sweep stores any.
 */
export async function launchRun(context: LaunchContext, runId: number): Promise<number> {
  const { store, claimant, bench, options } = context;
  const run = await store.getRun(runId);
  const setup = await sweepSetupFor(context, run);
  const control = new RunControl();
  // Tell other processes we are alive; if the run was taken from us (our heartbeat went stale), stop driving it
  // at once and write nothing more: its status is the new owner's now.
  const heartbeat = setInterval(() => {
    store.renewRunHeartbeat(runId, claimant.ownerId).then(
      async (stillOurs) => {
        if (!stillOurs) control.claimLost(new RunTakenOverError(runId, await store.getRunOwnership(runId).catch(() => undefined)));
      },
      () => undefined,
    );
  }, options.heartbeatIntervalMs ?? HEARTBEAT_INTERVAL_MS);
  heartbeat.unref();
  let first = true;
  let takenOver = false;
  let ended: RunStatus = 'failed';
  const release = () => store.releaseRun(runId, claimant.ownerId).catch(() => undefined);
  const firstStep = await store.nextStep(runId);
  const finished = runSweep({
    ...setup,
    store,
    runId,
    firstStep,
    ownerId: claimant.ownerId,
    control,
    giveUpAfterS: options.giveUpAfterS ?? 120,
    emit: (event, payload) => context.emit(event, payload),
    connectInstruments: async () => {
      if (first) {
        first = false;
        return bench.currentInstruments();
      }
      return bench.reconnectAll();
    },
  })
    .then(
      (status) => (ended = status),
      (error: unknown) => {
        takenOver = error instanceof RunTakenOverError;
        throw error;
      },
    )
    .finally(async () => {
      clearInterval(heartbeat);
      context.active.delete(runId);
      if (takenOver) return; // the figures are the new owner's to store
      // A finished run (done, stopped, failed) is nobody's from the moment it ends, so it is never listed as
      // driven while its analysis runs; a paused one stays this process's until its figures are stored.
      if (ended !== 'paused') await release();
      await finalizeRun(context, runId);
      if (ended === 'paused') await release();
    });
  // The caller learns the outcome through waitForRun/events; an unobserved rejection must not crash the process.
  finished.catch(() => undefined);
  context.active.set(runId, { control, finished });
  return firstStep;
}
