import { databaseUrlScheme, openStore, type RolloffStore, type StoreOpenOptions } from '../store';
import { OutboxStore } from '../store/outbox/outbox-store';
import { outboxPathFor } from '../store/outbox/outbox-path';
import { RolloffService, type RolloffServiceOptions } from './service';
import type { LocalService } from './local-service';

/**
 * The service over the store the --db value names: a SQLite file path, or a
 * database URL (app/store/open-store.ts chooses). A server store gets this
 * bench's outbox in front of it (app/store/outbox/), so a sweep goes on when
 * the network drops. The service owns the store.
 */
export async function openServiceAt(databaseLocation: string, options: RolloffServiceOptions = {}, storeOptions: StoreOpenOptions = {}): Promise<RolloffService> {
  const opened = await openStore(databaseLocation, storeOptions);
  let store: RolloffStore = opened;
  try {
    if (databaseUrlScheme(databaseLocation) !== undefined && !opened.readonly) store = OutboxStore.open(opened, { path: outboxPathFor(opened.location) });
    return await RolloffService.open(store, options);
  } catch (error) {
    await store.close();
    throw error;
  }
}

/** The same service as the CLI holds it: the contract and the in-process calls of LocalService, never the store behind it. */
export async function openLocalServiceAt(databaseLocation: string, options: RolloffServiceOptions = {}): Promise<LocalService> {
  return openServiceAt(databaseLocation, options);
}
