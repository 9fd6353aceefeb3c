/**
 * Chooses the store implementation from what the user gave as --db (or
 * ROLLOFF_DB): a database URL (scheme://…) goes to the server store of that
 * scheme, file:PATH and anything else is a SQLite file path, as it always was.
 */
import { fileURLToPath } from 'node:url';
import { SqliteStore } from './sqlite-store';
import { StoreUnavailableError } from './errors';
import { PostgresStore } from './postgres/postgres-store';
import { POSTGRES_SCHEMES } from './postgres/connection';
import type { RolloffStore } from './store-interface';
import type { StoreOpenOptions } from './types';

export type StoreOpener = (location: string, options: StoreOpenOptions) => Promise<RolloffStore>;

/** Server stores by URL scheme. */
const SERVER_STORES: Record<string, StoreOpener> = Object.fromEntries(POSTGRES_SCHEMES.map((scheme) => [scheme, PostgresStore.open]));

/** What --db accepts, for the message that refuses anything else. */
export const ACCEPTED_DATABASE_FORMS = 'a SQLite file path (./bench.sqlite, or file:./bench.sqlite), or a PostgreSQL address postgres://USER@HOST:PORT/DATABASE (postgresql:// also)';

/** file:PATH and file:///ABSOLUTE/PATH name a SQLite file; a plain path is one already. */
function sqlitePathOf(location: string): string {
  if (/^file:\/\//i.test(location)) return fileURLToPath(location);
  return location.replace(/^file:/i, '');
}

/** "postgres" for postgres://…; undefined for a file path (Windows drive letters included: C:\… has no "//"). */
export function databaseUrlScheme(location: string): string | undefined {
  return /^([a-z][a-z0-9+.-]*):\/\//i.exec(location)?.[1]?.toLowerCase();
}

/**
 * Refuses a location no store can open (an unknown scheme, a scheme without
 * "//") with the accepted forms; gives the server store's opener for a
 * database address, undefined for a SQLite file path. Opens nothing.
 */
export function checkDatabaseLocation(location: string): StoreOpener | undefined {
  if (/^file:/i.test(location)) return undefined;
  const scheme = databaseUrlScheme(location);
  // "postgres:lab" (no //) is a typo for an address far more often than a file name; C:\… (one letter) is a drive.
  const bareScheme = scheme === undefined ? /^([a-z][a-z0-9+.-]+):/i.exec(location)?.[1] : undefined;
  if (scheme === undefined && bareScheme === undefined) return undefined;
  const opener = scheme === undefined ? undefined : SERVER_STORES[scheme];
  if (!opener) {
    throw new StoreUnavailableError(
      `${scheme ?? bareScheme}:…`,
      scheme === undefined ? 'looks like a database address but has no "//" after the scheme' : `no store for "${scheme}" database addresses`,
      `Give ${ACCEPTED_DATABASE_FORMS}.`,
    );
  }
  return opener;
}

export async function openStore(location: string, options: StoreOpenOptions = {}): Promise<RolloffStore> {
  const serverStore = checkDatabaseLocation(location);
  return serverStore ? serverStore(location, options) : SqliteStore.open(sqlitePathOf(location), options);
}
