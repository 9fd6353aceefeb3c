/**
 * The loop every run goes through: set, settle, measure, store — one step at a
 * time, each step's result committed to the store the moment it is measured.
 * Starting again on a run continues at the store's next step, so a crash loses
 * no step and repeats none. A sweep's steps are points (run-sweep.ts), a noise
 * run's are records (run-noise.ts); the loop is the same.
 */
import type { BenchClock } from '../../bench/clock';
import type { PointColumns, RunEvent, RunProgress, RunStatus, ServiceEvents } from '../../contract/contract';
import { RunTakenOverError, type OwnerCondition, type SweepStore } from '../../store';
import type { RunControl } from './control';
import { withRecovery } from './recovery';
import { RemeasureStep } from './errors';
import type { StepMeasurer, StepSetting, SweepInstruments } from './types';

/** A step re-measured this often with changed settings (e.g. wider scope scale) is taken as it is. */
const MAX_REMEASURE = 8;

export type RunLog = (level: RunEvent['level'], message: string) => Promise<void>;

export interface StepRunOptions<R> {
  /** Only the few store methods a run uses: a fake of them drives the runner in tests. */
  store: Pick<SweepStore, 'nextStep' | 'updateRunStatus' | 'appendEvent' | 'loadPoints'>;
  runId: number;
  /** The step to start at: the store's next step, read by the caller once the run is its own (it reports it). */
  firstStep: number;
  /**
   * The owner id this process holds the run under (RunStore.claimRun): every
   * status, step and event line it writes is conditional on still owning the run, so once
   * another process has taken it over nothing of this run reaches the store.
   */
  ownerId?: string;
  clock: BenchClock;
  control: RunControl;
  measurer: StepMeasurer<R>;
  /** Stores one step's result durably as the run's owner (and announces it); the runner then reports progress. */
  commit(setting: StepSetting, result: R, retried: boolean, log: RunLog, asOwner: OwnerCondition | undefined): Promise<void>;
  /** What the run's log calls it: "sweep", "noise run". */
  noun: string;
  /** Opens (or re-opens after a disconnect) the instruments the sweep uses. */
  connectInstruments(): Promise<SweepInstruments>;
  plannedSteps: StepSetting[];
  /** Extra steps after the planned ones, from the points so far (refinement); [] when finished. */
  nextExtraSteps?(points: PointColumns, firstStep: number): StepSetting[];
  /** Give up and mark the run failed when the link stays down this long (bench seconds). */
  giveUpAfterS: number;
  emit<E extends 'progress' | 'runEvent'>(event: E, payload: ServiceEvents[E]): void;
}

export async function runSteps<R>(options: StepRunOptions<R>): Promise<RunStatus> {
  const { store, runId, clock, control, firstStep } = options;
  const asOwner = options.ownerId === undefined ? undefined : { asOwner: options.ownerId };
  const log = async (level: RunEvent['level'], message: string) => {
    const event = await store.appendEvent(runId, level, message, undefined, asOwner);
    options.emit('runEvent', { runId, ...event });
  };
  const setStatus = (status: RunStatus) => store.updateRunStatus(runId, status, undefined, asOwner);
  await setStatus('running');
  const noun = options.noun;
  await log('info', firstStep === 0 ? `${noun} started` : `${noun} continued at step ${firstStep}`);

  let instruments: SweepInstruments | undefined;
  const reconnect = async () => {
    instruments = await options.connectInstruments();
    await options.measurer.prepare(instruments);
  };
  const recovery = { runId, clock, giveUpAfterS: options.giveUpAfterS, reconnect, log };

  let queue = options.plannedSteps.filter((s) => s.step >= firstStep);
  // Steps stored so far plus steps still queued (refinement may add more later).
  const total = async () => (await store.nextStep(runId)) + queue.length;
  const startedS = clock.nowS();
  let physicalDoneS = 0;

  // The last measured point waits here and is stored during the longer of the next step's two waits: the
  // rest of its settling (stored at once) or its acquisition (stored once that is under way). A store
  // commit is synchronous and fully durable, so it holds up whatever falls due while it runs; in the
  // longer wait it usually ends first, and it never shortens anything physical. It is stored before
  // anything else reads the store.
  let unstored: (() => Promise<void>) | undefined;
  let storing: Promise<void> | undefined;
  let storeError: unknown;
  const startStoring = () => {
    const storeIt = unstored;
    if (!storeIt) return;
    unstored = undefined;
    storing = storeIt().catch((error: unknown) => {
      storeError ??= error;
    });
  };
  /** Stores the measured point now unless that has begun, and waits until it is stored. */
  const stored = async () => {
    startStoring();
    await storing;
    storing = undefined;
    if (storeError !== undefined) {
      const error = storeError;
      storeError = undefined;
      throw error;
    }
  };
  // Called by the measurer once its acquisition has been sent; the commit waits one turn of the event loop so
  // that command leaves first.
  const acquiring = () => void setImmediate(startStoring);

  const storeStep = async (setting: StepSetting, result: R, retried: boolean) => {
    await options.commit(setting, result, retried, log, asOwner);
    physicalDoneS += setting.settleS + setting.averages * setting.integrateS;
    options.emit('progress', progress(runId, setting.step + 1, await total(), etaS(queue, clock.nowS() - startedS, physicalDoneS) / clock.timeScale, 'running'));
  };

  try {
    await withRecovery(reconnect, recovery);
    for (;;) {
      if (queue.length === 0 && options.nextExtraSteps) {
        await stored();
        queue = options.nextExtraSteps(await store.loadPoints(runId), await store.nextStep(runId));
        if (queue.length > 0) await log('info', `refinement: ${queue.length} extra point(s) near the −3 dB and gain-limit points`);
      }
      const setting = queue[0];
      if (!setting) break;
      if (control.pending === 'lost') throw control.lostReason;
      if (control.pending !== 'none') {
        await stored();
        return await halt(control.pending === 'stop' ? 'stopped' : 'paused');
      }

      const upcoming = queue[1];
      /** When the generator acknowledged the next step's setting (bench seconds), once it has. */
      let upcomingAppliedAtS = NaN;
      const attempt = async () => {
        for (let tries = 1; ; tries++) {
          try {
            upcomingAppliedAtS = NaN;
            const read = await options.measurer.acquire(instruments!, setting, acquiring);
            // The stimulus of this step is no longer needed: move the generator on so the next step's settling
            // runs while this step's data are read back, reduced and stored.
            const next = upcoming && control.pending === 'none' ? upcoming : undefined;
            const ahead = next ? options.measurer.apply(instruments!, next).then(() => void (upcomingAppliedAtS = clock.nowS())) : undefined;
            const [value] = await Promise.all([read(next), ahead]);
            return value;
          } catch (error) {
            if (!(error instanceof RemeasureStep) || tries >= MAX_REMEASURE) throw error;
            await log('info', `step ${setting.step}: ${error.message}; measuring it again`);
          }
        }
      };
      const { value: result, retried } = await withRecovery(attempt, recovery);
      // The previous point, unless its storing began while this step acquired.
      await stored();
      queue.shift();
      unstored = () => storeStep(setting, result, retried);
      const settlingLeftS = upcomingAppliedAtS + (upcoming?.settleS ?? 0) - clock.nowS();
      if (upcoming && settlingLeftS > upcoming.averages * upcoming.integrateS) startStoring();
    }
    await stored();
    await outputOff(instruments, log);
    await setStatus('done');
    await log('info', `${noun} finished`);
    const done = await total();
    options.emit('progress', progress(runId, done, done, 0, 'done'));
    return 'done';
  } catch (error) {
    if (error instanceof RunTakenOverError || control.pending === 'lost') {
      // The run is another process's now, and so may be the instruments it drives: send nothing, write nothing.
      const reason = error instanceof RunTakenOverError ? error : (control.lostReason ?? error);
      options.emit('runEvent', { runId, at: new Date().toISOString(), level: 'error', message: (reason as Error).message });
      throw reason;
    }
    // A point measured before the failure is kept (unless storing it was the failure).
    await stored().catch(() => undefined);
    await outputOff(instruments, log);
    await setStatus('failed');
    await log('error', `${noun} failed: ${(error as Error).message}`);
    options.emit('progress', progress(runId, await store.nextStep(runId), await total(), 0, 'failed'));
    throw error;
  }

  async function halt(status: 'stopped' | 'paused'): Promise<RunStatus> {
    await outputOff(instruments, log);
    await setStatus(status);
    const nextStep = await store.nextStep(runId);
    await log('info', status === 'paused' ? `paused before step ${nextStep}` : 'stopped by the user');
    options.emit('progress', progress(runId, nextStep, await total(), 0, status));
    return status;
  }
}

function progress(runId: number, step: number, total: number, etaS: number, status: RunStatus): RunProgress {
  return { runId, step, total, etaS, status };
}

/** Remaining physical time (bench seconds) scaled by how the sweep has kept pace with its physical minimum so far; the caller converts to wall seconds. */
function etaS(queue: StepSetting[], elapsedS: number, physicalDoneS: number): number {
  const remainingS = queue.reduce((sum, s) => sum + s.settleS + s.averages * s.integrateS, 0);
  const pace = physicalDoneS > 0 ? Math.max(1, elapsedS / physicalDoneS) : 1;
  return remainingS * pace;
}

/** The generator is switched off whenever a run leaves the running state: nothing stays driven unattended. */
async function outputOff(instruments: SweepInstruments | undefined, log: RunLog): Promise<void> {
  if (!instruments) return;
  try {
    await instruments.generator.setOutput(false);
  } catch (error) {
    await log('warning', `could not switch the generator output off: ${(error as Error).message}`);
  }
}
