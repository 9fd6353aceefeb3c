/** Where the database lives when the user does not say. */
import { homedir } from 'node:os';
import { join, win32 } from 'node:path';
import type { DatabaseSource } from '../contract/store-choice';

export const DATABASE_FILE_NAME = 'rolloff.sqlite';

export interface PathEnvironment {
  env: Record<string, string | undefined>;
  platform: NodeJS.Platform;
  homeDir: string;
}

function currentEnvironment(): PathEnvironment {
  return { env: process.env, platform: process.platform, homeDir: homedir() };
}

/** The per-user data folder for this platform, following each platform's own convention. */
export function userDataFolder(environment: PathEnvironment = currentEnvironment()): string {
  const { env, platform, homeDir } = environment;
  if (platform === 'win32') {
    const appData = env.APPDATA || win32.join(homeDir, 'AppData', 'Roaming');
    return win32.join(appData, 'Rolloff');
  }
  if (platform === 'darwin') return join(homeDir, 'Library', 'Application Support', 'Rolloff');
  // XDG Base Directory Specification: a relative XDG_DATA_HOME is invalid and ignored.
  const xdg = env.XDG_DATA_HOME;
  const dataHome = xdg && xdg.startsWith('/') ? xdg : join(homeDir, '.local', 'share');
  return join(dataHome, 'rolloff');
}

export interface DatabaseChoice {
  location: string;
  source: DatabaseSource;
}

/**
 * --db wins over ROLLOFF_DB, which wins over the window's saved setting
 * (desktop window only; the CLI has none), which wins over the default file
 * in the per-user data folder.
 */
export function resolveDatabaseChoice(dbOption: string | undefined, savedSetting: string | undefined = undefined, environment: PathEnvironment = currentEnvironment()): DatabaseChoice {
  if (dbOption) return { location: dbOption, source: 'command line' };
  const fromEnvironment = environment.env.ROLLOFF_DB;
  if (fromEnvironment) return { location: fromEnvironment, source: 'environment' };
  if (savedSetting) return { location: savedSetting, source: 'saved setting' };
  const folder = userDataFolder(environment);
  return { location: environment.platform === 'win32' ? win32.join(folder, DATABASE_FILE_NAME) : join(folder, DATABASE_FILE_NAME), source: 'default' };
}

/** The database path: ROLLOFF_DB if set, else rolloff.sqlite in the user data folder. */
export function defaultDatabasePath(environment: PathEnvironment = currentEnvironment()): string {
  return resolveDatabaseChoice(undefined, undefined, environment).location;
}

/** The CLI's --db wins over ROLLOFF_DB, which wins over the platform default. */
export function resolveDatabasePath(dbOption: string | undefined, environment: PathEnvironment = currentEnvironment()): string {
  return resolveDatabaseChoice(dbOption, undefined, environment).location;
}
