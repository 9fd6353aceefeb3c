/**
 * The real service as the window hosts (web host, Electron main) use it:
 * the RolloffApi, one subscription for every event, and a clean close.
 *
 * The host answers the store choice itself (storeInUse, chooseStore): choosing
 * another store opens a new service on it and, once that worked, closes the
 * old one, so a store that cannot be opened leaves the window where it was.
 * The subscribers stay subscribed across the change, and each is told of it
 * (the 'store' event): a second window of the same host must not go on
 * showing the old store's runs.
 */
import { isAbsolute, resolve } from 'node:path';
import type { RolloffService, RolloffServiceOptions } from '../service/service';
import { openServiceAt } from '../service/open-service';
import { API_METHOD_NAMES } from '../contract/check-call';
import type { DatabaseSource, RolloffApi, ServiceEventName, StoreChoiceMethodName, StoreInUse } from '../contract/contract';
import { checkDatabaseLocation, databaseUrlScheme } from '../store';
import { UserError } from '../errors';
import { readUserSettings, saveDatabaseSetting } from './user-settings-file';

type EventListener = (event: ServiceEventName, payload: unknown) => void;

export interface HostedService {
  api: RolloffApi;
  subscribe(listener: EventListener): () => void;
  close(): Promise<void>;
  /** The service in use now (another one after chooseStore). */
  readonly service: RolloffService;
}

/** How the store in use was chosen, and what a choice in the window does. */
export interface StoreChoiceOptions {
  source: DatabaseSource;
  /** The desktop window saves a choice here; without it a choice lasts until the host stops (rolloff serve). */
  settingsFile?: string;
  /** Said with the store in use, e.g. that the settings file could not be read. */
  notes?: string[];
}

/** The service over the store at databaseLocation (a SQLite path or a database URL). */
export async function openHostedService(databaseLocation: string, options: RolloffServiceOptions = {}, choice: StoreChoiceOptions = { source: 'command line' }): Promise<HostedService> {
  const serviceOptions: RolloffServiceOptions = { followLab: true, ...options };
  let service = await openServiceAt(databaseLocation, serviceOptions);
  const listeners = new Set<EventListener>();
  const forward = (target: RolloffService) => target.events.onAny((event, payload) => {
    for (const listener of listeners) listener(event, payload);
  });
  let stopForwarding = forward(service);
  let source = choice.source;
  const startNotes = choice.notes ?? [];
  let opening = false;

  const storeInUse = (): StoreInUse => ({
    location: service.databaseLocation,
    kind: databaseUrlScheme(service.databaseLocation) === undefined ? 'sqlite file' : 'lab store',
    source,
    choiceKept: choice.settingsFile ? 'saved' : 'until restart',
    ...(choice.settingsFile ? { settingsFile: choice.settingsFile } : {}),
    notes: [...startNotes, ...overrideNote(choice)],
  });

  async function chooseStore(location: string): Promise<StoreInUse> {
    checkDatabaseLocation(location); // an unknown scheme is refused with the accepted forms before anything is opened
    // A relative file path means the host's working folder, which the window cannot see: keep it absolute.
    const chosen = databaseUrlScheme(location) !== undefined || /^file:/i.test(location) || isAbsolute(location) ? location : resolve(location);
    if (chosen === service.databaseLocation) return storeInUse();
    if (opening) throw new UserError('Another store is being opened now.', 'Wait until it is open, then choose again.');
    if (choice.settingsFile) {
      const settings = readUserSettings(choice.settingsFile);
      if (settings.problem) throw settings.problem; // never overwrite a file the user may still want
    }
    await refuseWhileRunIsActive(service);
    opening = true;
    try {
      // The new store's own saved limit applies (a --max-stimulus given at start was for the store opened then).
      const next = await openServiceAt(chosen, { ...serviceOptions, maxStimulusVpp: undefined });
      const previous = service;
      try {
        await refuseWhileRunIsActive(previous); // a run may have started while the new store was opening
      } catch (error) {
        await next.close();
        throw error;
      }
      stopForwarding();
      service = next;
      stopForwarding = forward(next);
      source = choice.settingsFile ? 'saved setting' : 'chosen in the window';
      await previous.close();
      const now = storeInUse();
      for (const listener of listeners) listener('store', now);
      if (choice.settingsFile) {
        try {
          saveDatabaseSetting(choice.settingsFile, chosen);
        } catch (error) {
          const why = error instanceof Error ? error.message : String(error);
          throw new UserError(`Now using ${next.databaseLocation}, but the choice could not be saved: ${why}`, 'The next start opens the store it opened before; choose again once the settings file can be written.');
        }
      }
      return storeInUse();
    } finally {
      opening = false;
    }
  }

  // Every other method goes to the service in use at the moment of the call.
  const storeChoice: Record<StoreChoiceMethodName, (...args: never[]) => Promise<StoreInUse>> = { storeInUse: async () => storeInUse(), chooseStore };
  const serviceMethods = Object.fromEntries(
    API_METHOD_NAMES.filter((name) => !(name in storeChoice)).map((name) => [name, (...args: unknown[]) => (service[name as keyof RolloffService] as (...values: unknown[]) => Promise<unknown>).apply(service, args)]),
  );
  const api = { ...serviceMethods, ...storeChoice } as RolloffApi;

  return {
    api,
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
    close: async () => {
      stopForwarding();
      await service.close();
    },
    get service() {
      return service;
    },
  };
}

/** A run this service drives would lose its store: refused, naming the run. */
async function refuseWhileRunIsActive(service: RolloffService): Promise<void> {
  const [runId] = service.drivenRunIds;
  if (runId !== undefined) {
    const run = (await service.listRuns()).find((summary) => summary.id === runId);
    throw new UserError(
      `Run #${runId}${run ? ` (${run.designName} — ${run.buildLabel})` : ''} is active on this bench; the store cannot be changed under it.`,
      'Pause or stop it on the Sweep view first (a paused run can be resumed later), then choose the store again.',
    );
  }
  service.requireIdleBench(); // a run being started
}

/** The store given at start by --db or ROLLOFF_DB is opened again at the next start, whatever is saved. */
function overrideNote(choice: StoreChoiceOptions): string[] {
  if (!choice.settingsFile) return [];
  if (choice.source === 'command line') return ['This window was started with --db: a store chosen here is saved, but --db wins at the next start.'];
  if (choice.source === 'environment') return ['This window was started with ROLLOFF_DB set: a store chosen here is saved, but ROLLOFF_DB wins at the next start.'];
  return [];
}
