/**
 * The events the service pushes to every connected window, as schemas (one
 * per event name), their payloads' types inferred from them. The names alone
 * are in events.ts, which imports no valibot, so that the Electron preload
 * bundles without the validation library; the window checks every payload
 * against these (check-reply.ts) before a view hears it.
 */
import * as v from 'valibot';
import { storeId } from './field-schemas';
import type { ServiceEventName } from './events';
import { count, quantity, replyObject } from './reply-fields';
import { BenchStatusSchema, TrafficLineSchema } from './bench-results';
import { RUN_EVENT_FIELDS, RunProgressSchema } from './run-results';
import { StoreInUseSchema } from './store-choice';

/** Events pushed from the service to every connected window: the schema of each one's payload. */
export const SERVICE_EVENT_SCHEMAS = {
  progress: RunProgressSchema,
  /** A point as it is measured (NaN, or null after JSON, where a value does not apply, as in PointColumns). */
  point: replyObject({
    runId: storeId,
    index: count,
    stimulus: quantity,
    gainDb: quantity,
    phaseDeg: quantity,
    outputV: quantity,
    flags: count,
    gainUncertaintyDb: quantity,
    phaseUncertaintyDeg: quantity,
  }),
  /** A line of a run's log (RunEvent), with the run it belongs to. */
  runEvent: replyObject({ runId: storeId, ...RUN_EVENT_FIELDS }),
  traffic: TrafficLineSchema,
  bench: BenchStatusSchema,
  /** The host opened another store (chooseStore in some window): every window of that host works on it now. */
  store: StoreInUseSchema,
} satisfies { readonly [E in ServiceEventName]: v.GenericSchema };

/** Events pushed from the service to every connected window. */
export type ServiceEvents = { [E in ServiceEventName]: v.InferOutput<(typeof SERVICE_EVENT_SCHEMAS)[E]> };
