/**
 * Numbered PostgreSQL migrations (migrations/postgres/NNNN_name.sql), applied
 * in order under a session advisory lock, so benches that open a new lab
 * database at the same moment migrate it once: the first takes the lock and
 * migrates, the others wait, then find the version current. Each migration runs
 * in one transaction with its schema_migrations row (PostgreSQL's DDL is
 * transactional), so the database is always at a whole version.
 */
import type { PoolClient } from 'pg';
import { SOFTWARE_VERSION } from '../../contract/version';
import { StoreDamagedError, StoreUnavailableError, StoreVersionError } from '../errors';
import { latestVersion, loadMigrations, type Migration } from '../migrations';
import { migrationsFolder } from '../migrations-folder';

/** pg_advisory_lock key: the bytes of "rolloff" read as a number, so no other program's lock is likely to collide. */
const MIGRATION_LOCK_KEY = 0x726f6c6c6f6666n.toString();

export function loadPostgresMigrations(folder: string = migrationsFolder('postgres')): Migration[] {
  return loadMigrations(folder);
}

interface SchemaState {
  version: number;
  writerAppVersion: string | undefined;
  /** Tables in the public schema that are not Rolloff's bookkeeping. */
  tableCount: number;
}

async function schemaState(client: PoolClient): Promise<SchemaState> {
  const { rows } = await client.query<{ has_migrations: boolean; table_count: string }>(
    `SELECT to_regclass('schema_migrations') IS NOT NULL AS has_migrations,
            (SELECT count(*) FROM pg_tables WHERE schemaname = current_schema()) AS table_count`,
  );
  const tableCount = Number(rows[0].table_count);
  if (!rows[0].has_migrations) return { version: 0, writerAppVersion: undefined, tableCount };
  const newest = await client.query<{ version: number; app_version: string }>('SELECT version, app_version FROM schema_migrations ORDER BY version DESC LIMIT 1');
  return { version: newest.rows[0]?.version ?? 0, writerAppVersion: newest.rows[0]?.app_version, tableCount };
}

export async function schemaVersionIn(client: PoolClient): Promise<number> {
  return (await schemaState(client)).version;
}

/**
 * Brings the database to the newest known schema, or refuses it (newer schema,
 * another program's tables) before anything is written. Returns the versions applied.
 */
export async function migratePostgres(
  client: PoolClient,
  shownLocation: string,
  migrations: Migration[],
  options: { readonly: boolean; now: () => string },
): Promise<number[]> {
  const knownVersion = latestVersion(migrations);
  const refuseUnusable = (state: SchemaState): void => {
    if (state.version > knownVersion) {
      throw new StoreVersionError(shownLocation, state.version, knownVersion, state.writerAppVersion, SOFTWARE_VERSION);
    }
    if (state.version === 0 && state.tableCount > 0) {
      throw new StoreDamagedError(shownLocation, 'a PostgreSQL database of another program (tables but no Rolloff schema version), not a Rolloff database');
    }
  };
  const before = await schemaState(client);
  refuseUnusable(before);
  if (options.readonly) {
    if (before.version < knownVersion) {
      throw new StoreUnavailableError(
        shownLocation,
        `schema version ${before.version} needs upgrading to ${knownVersion} before it can be read`,
        'Open it once without read-only (any command that writes) so the upgrade is applied.',
      );
    }
    return [];
  }
  if (before.version === knownVersion) return [];

  const applied: number[] = [];
  await client.query('SELECT pg_advisory_lock($1::bigint)', [MIGRATION_LOCK_KEY]);
  try {
    // Another bench may have migrated while this one waited for the lock.
    const locked = await schemaState(client);
    refuseUnusable(locked);
    for (const migration of migrations) {
      if (migration.version <= locked.version) continue;
      await client.query('BEGIN');
      try {
        await client.query(`CREATE TABLE IF NOT EXISTS schema_migrations (
          version integer PRIMARY KEY, name text NOT NULL, applied_at timestamptz NOT NULL, app_version text NOT NULL)`);
        await client.query(migration.sql);
        await client.query('INSERT INTO schema_migrations (version, name, applied_at, app_version) VALUES ($1, $2, $3, $4)', [
          migration.version,
          migration.name,
          options.now(),
          SOFTWARE_VERSION,
        ]);
        await client.query('COMMIT');
      } catch (error) {
        await client.query('ROLLBACK');
        throw error;
      }
      applied.push(migration.version);
    }
  } finally {
    await client.query('SELECT pg_advisory_unlock($1::bigint)', [MIGRATION_LOCK_KEY]);
  }
  return applied;
}
