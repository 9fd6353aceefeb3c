/**
 * Numbered SQL migrations (migrations/NNNN_name.sql), applied in order, each in
 * its own transaction together with its schema_migrations row and
 * PRAGMA user_version, so a crash leaves the file at a whole version.
 *
 * A migration whose first line is FOREIGN_KEYS_OFF rebuilds a table others
 * refer to (SQLite cannot alter a constraint in place). SQLite's procedure
 * for that (sqlite.org, "ALTER TABLE", "Making Other Kinds Of Table Schema
 * Changes") turns foreign keys off around the transaction — the pragma does
 * nothing inside one, and with them on DROP TABLE would cascade to the rows
 * that refer to it — and runs PRAGMA foreign_key_check before committing.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import type Database from 'better-sqlite3';
import { migrationsFolder } from './migrations-folder';

export interface Migration {
  version: number;
  name: string;
  sql: string;
}

const MIGRATION_FILE = /^(\d{4})_([a-z0-9_]+)\.sql$/;
/** First line of a migration that must run with foreign keys off (see above). */
export const FOREIGN_KEYS_OFF = '-- rolloff-migration: foreign-keys-off';

/** Reads and checks the folder (SQLite's unless told): numbers must run 1, 2, 3 … with no gap or repeat. */
export function loadMigrations(folder: string = migrationsFolder('sqlite')): Migration[] {
  const migrations: Migration[] = [];
  for (const fileName of readdirSync(folder).sort()) {
    if (!fileName.endsWith('.sql')) continue;
    const match = MIGRATION_FILE.exec(fileName);
    if (!match) throw new Error(`migration file name "${fileName}" does not follow NNNN_name.sql`);
    migrations.push({ version: Number(match[1]), name: match[2], sql: readFileSync(join(folder, fileName), 'utf8') });
  }
  migrations.forEach((migration, index) => {
    if (migration.version !== index + 1) {
      throw new Error(`migrations must be numbered 0001, 0002, … without gaps; found ${migration.version} at position ${index + 1}`);
    }
  });
  return migrations;
}

export function latestVersion(migrations: Migration[]): number {
  return migrations.length === 0 ? 0 : migrations[migrations.length - 1].version;
}

export function schemaVersionOf(db: Database.Database): number {
  return db.pragma('user_version', { simple: true }) as number;
}

/** The app version that applied the newest migration, if the file records it. */
export function writerAppVersion(db: Database.Database): string | undefined {
  const table = db.prepare("SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = 'schema_migrations'").get();
  if (!table) return undefined;
  const row = db.prepare('SELECT app_version FROM schema_migrations ORDER BY version DESC LIMIT 1').get() as { app_version: string } | undefined;
  return row?.app_version;
}

/** Applies every migration above the file's version; returns the versions applied. */
export function applyMigrations(db: Database.Database, migrations: Migration[], appVersion: string, now: () => string): number[] {
  const applied: number[] = [];
  for (const migration of migrations) {
    if (migration.version <= schemaVersionOf(db)) continue;
    const foreignKeysOff = migration.sql.startsWith(FOREIGN_KEYS_OFF);
    const foreignKeysWereOn = db.pragma('foreign_keys', { simple: true }) === 1;
    if (foreignKeysOff) db.pragma('foreign_keys = OFF');
    // IMMEDIATE takes the write lock first, so a second process opening the same new file waits, then sees the version and skips.
    const ran = db.transaction(() => {
      if (migration.version <= schemaVersionOf(db)) return false;
      db.exec(`CREATE TABLE IF NOT EXISTS schema_migrations (
        version INTEGER PRIMARY KEY, name TEXT NOT NULL, applied_at TEXT NOT NULL, app_version TEXT NOT NULL)`);
      db.exec(migration.sql);
      if (foreignKeysOff) {
        const broken = db.pragma('foreign_key_check') as unknown[];
        if (broken.length > 0) throw new Error(`migration ${migration.version} (${migration.name}) would leave ${broken.length} row(s) referring to nothing; nothing was changed`);
      }
      db.prepare('INSERT INTO schema_migrations (version, name, applied_at, app_version) VALUES (?, ?, ?, ?)').run(
        migration.version,
        migration.name,
        now(),
        appVersion,
      );
      // user_version lives in the file header; setting it inside the transaction commits it atomically with the schema.
      db.pragma(`user_version = ${migration.version}`);
      return true;
    });
    let didRun: boolean;
    try {
      didRun = ran.immediate();
    } finally {
      if (foreignKeysOff && foreignKeysWereOn) db.pragma('foreign_keys = ON');
    }
    if (didRun) applied.push(migration.version);
  }
  return applied;
}
