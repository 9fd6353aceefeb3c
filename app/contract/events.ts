/**
 * The names of the events the service pushes to every connected window. This
 * file imports no valibot (its payloads' schemas and types are in
 * event-schemas.ts, imported here for types only), so that the Electron
 * preload, which passes on only these names, bundles without the validation
 * library (test/unit/main/build.test.ts holds it to that).
 */
export type { ServiceEvents } from './event-schemas';

/** Every event pushed to windows (the preload passes on only these); 'store' comes from the host, the others from the service. */
export const SERVICE_EVENT_NAMES = ['progress', 'point', 'runEvent', 'traffic', 'bench', 'store'] as const;
export type ServiceEventName = (typeof SERVICE_EVENT_NAMES)[number];
