/**
 * Chooses the store implementation from what the user gave as --db (or
 * ROLLOFF_DB): a database URL (scheme://…) goes to the server store of that
 * scheme, anything else is a SQLite file path, as it always was.
 */
import { SqliteStore } from './sqlite-store';
import { StoreUnavailableError } from './errors';
import type { RolloffStore } from './store-interface';
import type { StoreOpenOptions } from './types';

export type StoreOpener = (location: string, options: StoreOpenOptions) => Promise<RolloffStore>;

/** Server stores by URL scheme. The PostgreSQL store registers 'postgres' and 'postgresql' here. */
const SERVER_STORES: Record<string, StoreOpener> = {};

/** "postgres" for postgres://…; undefined for a file path (Windows drive letters included: C:\… has no "//"). */
export function databaseUrlScheme(location: string): string | undefined {
  return /^([a-z][a-z0-9+.-]*):\/\//i.exec(location)?.[1]?.toLowerCase();
}

export async function openStore(location: string, options: StoreOpenOptions = {}): Promise<RolloffStore> {
  const scheme = databaseUrlScheme(location);
  if (scheme === undefined) return SqliteStore.open(location, options);
  const opener = SERVER_STORES[scheme];
  if (!opener) {
    const known = Object.keys(SERVER_STORES);
    throw new StoreUnavailableError(
      `${scheme}://…`,
      `no store for "${scheme}" database addresses`,
      known.length > 0
        ? `Use a SQLite file path, or an address starting with ${known.map((k) => `${k}://`).join(' or ')}.`
        : 'Give the path of a SQLite file, e.g. --db ./bench.sqlite.',
    );
  }
  return opener(location, options);
}
