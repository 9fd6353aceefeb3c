import { openStore, type StoreOpenOptions } from '../store';
import { RolloffService, type RolloffServiceOptions } from './service';

/**
 * The service over the store the --db value names: a SQLite file path, or a
 * database URL (app/store/open-store.ts chooses). The service owns the store.
 */
export async function openServiceAt(databaseLocation: string, options: RolloffServiceOptions = {}, storeOptions: StoreOpenOptions = {}): Promise<RolloffService> {
  const store = await openStore(databaseLocation, storeOptions);
  try {
    return await RolloffService.open(store, options);
  } catch (error) {
    await store.close();
    throw error;
  }
}
