/**
 * The events the service pushes to every connected window, apart from the
 * schemas so that the Electron preload (which passes on only these names)
 * bundles without the validation library.
 */
import type { BenchStatus, RunEvent, RunProgress, TrafficLine } from './contract';

/** Events pushed from the service to every connected window. */
export interface ServiceEvents {
  progress: RunProgress;
  point: { runId: number; index: number; stimulus: number; gainDb: number; phaseDeg: number; outputV: number; flags: number; gainUncertaintyDb: number; phaseUncertaintyDeg: number };
  runEvent: { runId: number } & RunEvent;
  traffic: TrafficLine;
  bench: BenchStatus;
}

export type ServiceEventName = keyof ServiceEvents;

/** Every event the service pushes to windows (the preload passes on only these). */
export const SERVICE_EVENT_NAMES = ['progress', 'point', 'runEvent', 'traffic', 'bench'] as const satisfies readonly ServiceEventName[];
