/**
 * The desktop window's settings file (settings.json in Electron's per-user
 * folder): for now one setting, the store chosen in the window. Read once at
 * start; a file that cannot be read is reported and left as it is (the
 * default store is used), and saving over it is refused, so a user's file is
 * never replaced without their knowing.
 */
import { existsSync, readFileSync, renameSync, writeFileSync, mkdirSync } from 'node:fs';
import { dirname } from 'node:path';
import { UserError } from '../errors';
import { hasPasswordInAddress, PASSWORD_HINT } from '../contract/store-choice';

export const SETTINGS_FILE_NAME = 'settings.json';

export interface UserSettings {
  /** The store chosen in the window: a SQLite file path or a lab store's address (never with a password). */
  database?: string;
}

export interface SettingsRead {
  settings: UserSettings;
  /** Why the file could not be used (bad JSON, wrong shape, unreadable); the settings are then empty. */
  problem?: UserError;
  /** Keys the file holds besides ours, kept as they are when it is saved. */
  others: Record<string, unknown>;
}

export class SettingsFileError extends UserError {}

/** A missing file is no settings; any other trouble is a problem, said with the file and what to do. */
export function readUserSettings(path: string): SettingsRead {
  if (!existsSync(path)) return { settings: {}, others: {} };
  const unusable = (why: string) => ({
    settings: {},
    others: {},
    problem: new SettingsFileError(
      `The settings file ${path} ${why}; its settings are not used and the file is left as it is.`,
      'Correct the file (it is JSON, e.g. {"database": "/path/to/bench.sqlite"}), or delete it to start from the defaults.',
    ),
  });
  let parsed: unknown;
  try {
    parsed = JSON.parse(readFileSync(path, 'utf8'));
  } catch (error) {
    return unusable(error instanceof SyntaxError ? `is not valid JSON (${error.message})` : `cannot be read (${(error as Error).message})`);
  }
  if (typeof parsed !== 'object' || parsed === null || Array.isArray(parsed)) return unusable('does not hold a JSON object');
  const { database, ...others } = parsed as Record<string, unknown>;
  if (database !== undefined && (typeof database !== 'string' || database.trim() === '')) return unusable('has a "database" that is not a non-empty text');
  return { settings: database === undefined ? {} : { database: database.trim() }, others };
}

/**
 * Saves the store choice, keeping the file's other keys. Refused, leaving the
 * file untouched, when the file could not be read (see readUserSettings) or
 * the address carries a password. Written to a temporary file and renamed, so
 * a crash mid-write leaves the old file whole.
 */
export function saveDatabaseSetting(path: string, location: string): void {
  if (hasPasswordInAddress(location)) throw new SettingsFileError('The store address has a password in it, which is never saved.', PASSWORD_HINT);
  const current = readUserSettings(path);
  if (current.problem) throw current.problem;
  mkdirSync(dirname(path), { recursive: true });
  const temporary = `${path}.${process.pid}.tmp`;
  writeFileSync(temporary, `${JSON.stringify({ ...current.others, database: location }, null, 2)}\n`, { mode: 0o600 });
  renameSync(temporary, path);
}
