/**
 * Where the numbered SQL files are, for both stores and every entry (CLI,
 * `rolloff serve`, the desktop bundle, the packaged app). The code runs at
 * different depths — app/store/ from the sources, out/electron/main.mjs once
 * esbuild has bundled the main process (import.meta.url is then the bundle's),
 * app.asar/out/electron/ when packaged — so the folder is found by walking up
 * from the running code to the nearest migrations/ holding both databases'
 * first migration, rather than by a fixed relative path that holds for one
 * layout only.
 */
import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { StoreUnavailableError } from './errors';

export type MigrationsDialect = 'sqlite' | 'postgres';

/** migrations/ holds SQLite's files; each server database has its own subfolder. */
const DIALECT_FOLDERS: Record<MigrationsDialect, readonly string[]> = { sqlite: [], postgres: ['postgres'] };

/** Present in every release's folders (migrations are never removed), so it marks the right migrations/. */
const FIRST_MIGRATION = '0001_initial.sql';

const RUNNING_CODE_FOLDER = dirname(fileURLToPath(import.meta.url));

function holdsEveryDialect(candidate: string): boolean {
  return Object.values(DIALECT_FOLDERS).every((parts) => existsSync(join(candidate, ...parts, FIRST_MIGRATION)));
}

/** The migrations/ folder nearest above codeFolder (the running code's folder unless a test says otherwise). */
export function migrationsRoot(codeFolder: string = RUNNING_CODE_FOLDER): string {
  for (let folder = codeFolder; ; folder = dirname(folder)) {
    const candidate = join(folder, 'migrations');
    if (holdsEveryDialect(candidate)) return candidate;
    if (dirname(folder) === folder) break;
  }
  throw new StoreUnavailableError(
    codeFolder,
    `no migrations/ folder (with ${FIRST_MIGRATION} and postgres/${FIRST_MIGRATION}) in this folder or any above it, so no database can be opened or created`,
    'The installation is incomplete: reinstall Rolloff. In a clone, restore the project\'s migrations/ folder (git checkout -- migrations).',
  );
}

/** The folder of one database's NNNN_name.sql files. */
export function migrationsFolder(dialect: MigrationsDialect, codeFolder: string = RUNNING_CODE_FOLDER): string {
  return join(migrationsRoot(codeFolder), ...DIALECT_FOLDERS[dialect]);
}
