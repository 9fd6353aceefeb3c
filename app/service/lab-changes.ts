/**
 * Sweeps driven by other processes on a shared store (a lab's PostgreSQL
 * database), passed on as the same service events a window gets for its own
 * sweeps: points, progress and run events. The store says which run moved; this
 * loads what is new and remembers how much of each run it has passed on.
 */
import type { ServiceEventName, ServiceEvents } from '../contract/contract';
import type { RolloffStore } from '../store/store-interface';
import type { StoreChange, StoreChangeFeed } from '../store/types';

export interface LabChangeOptions {
  store: RolloffStore;
  /** Runs this process drives: their events come from the sweep itself. */
  drivesRun: (runId: number) => boolean;
  emit: <E extends ServiceEventName>(event: E, payload: ServiceEvents[E]) => void;
  forcePolling?: boolean;
  pollIntervalMs?: number;
}

export async function followLabChanges(options: LabChangeOptions): Promise<StoreChangeFeed | undefined> {
  const { store } = options;
  if (!store.watchChanges) return undefined;
  const pointsSent = new Map<number, number>();
  const eventsSent = new Map<number, number>();
  // One run's changes are handled in the order they came, one at a time.
  const queues = new Map<number, Promise<void>>();
  const handle = async (change: StoreChange) => {
    const { runId } = change;
    if (options.drivesRun(runId)) return;
    const run = await store.getRun(runId);
    if (change.kind === 'points' || change.kind === 'status') {
      const points = await store.loadPoints(runId);
      for (let i = pointsSent.get(runId) ?? 0; i < points.step.length; i++) {
        options.emit('point', {
          runId, index: points.step[i], stimulus: points.stimulus[i], gainDb: points.gainDb[i], phaseDeg: points.phaseDeg[i], outputV: points.outputV[i],
          flags: points.flags[i], gainUncertaintyDb: points.gainUncertaintyDb[i], phaseUncertaintyDeg: points.phaseUncertaintyDeg[i],
        });
      }
      pointsSent.set(runId, points.step.length);
      // A noise run stores records, not points: its point count counts them (the window reads the run again on progress).
      const next = run.kind === 'noise' ? run.pointCount : points.step.length === 0 ? 0 : points.step[points.step.length - 1] + 1;
      // The remaining time is known only to the process that drives the sweep.
      options.emit('progress', { runId, step: next, total: Math.max(run.plannedCount, next), etaS: 0, status: run.status });
    }
    if (change.kind === 'event') {
      const events = await store.listEvents(runId);
      for (const event of events.slice(eventsSent.get(runId) ?? 0)) options.emit('runEvent', { runId, ...event });
      eventsSent.set(runId, events.length);
    }
  };
  return store.watchChanges(
    (change) => {
      const previous = queues.get(change.runId) ?? Promise.resolve();
      const current = previous.then(() => handle(change)).catch(() => {}); // the store away for a moment: the next change catches up
      queues.set(change.runId, current);
    },
    { forcePolling: options.forcePolling, pollIntervalMs: options.pollIntervalMs },
  );
}
