/**
 * The store the desktop window opens at start: --db, then ROLLOFF_DB, then
 * the store saved in the window's settings file, then the default file. A
 * settings file that cannot be read, or a saved store that cannot be opened
 * (a lab server down, a file moved), does not keep the window from starting:
 * the default file is opened and the window says why (storeInUse().notes).
 */
import type { RolloffServiceOptions } from '../service/service';
import { resolveDatabaseChoice, type PathEnvironment } from '../store';
import { redactDatabaseUrl } from '../store/postgres/connection';
import { openHostedService, type HostedService } from './hosted-service';
import { readUserSettings } from './user-settings-file';

export async function openDesktopService(
  dbOption: string | undefined,
  settingsFile: string,
  options: RolloffServiceOptions,
  environment?: PathEnvironment,
): Promise<HostedService> {
  const saved = readUserSettings(settingsFile);
  const notes = saved.problem ? [`${saved.problem.message} ${saved.problem.hint ?? ''}`.trim()] : [];
  const choice = resolveDatabaseChoice(dbOption, saved.settings.database, environment);
  try {
    return await openHostedService(choice.location, options, { source: choice.source, settingsFile, notes });
  } catch (error) {
    if (choice.source !== 'saved setting') throw error;
    const why = error instanceof Error ? error.message : String(error);
    const fallback = resolveDatabaseChoice(undefined, undefined, environment);
    notes.push(`The saved store ${redactDatabaseUrl(choice.location)} could not be opened (${why}); the default file is open instead. Choose the store again below once it can be reached.`);
    return openHostedService(fallback.location, options, { source: fallback.source, settingsFile, notes });
  }
}
