/**
 * Both stores find their migrations wherever the code runs: from the sources,
 * and from the bundled main process inside the packaged app. The packaged app's
 * contents are laid out with electron-builder's own file matcher applied to the
 * `files` of electron-builder.yml (app.asar holds exactly what it passes, at the
 * same relative paths), so dropping migrations from the package, or moving the
 * bundle, fails here. Expected folders: the project's migrations/ and
 * migrations/postgres/ — common practice, no source.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, relative, resolve } from 'node:path';
import { getConfig } from 'app-builder-lib/out/util/config/config';
import { getFileMatchers } from 'app-builder-lib/out/fileMatcher';
import { StoreUnavailableError, loadMigrations, migrationsFolder } from '../../../app/store';
import { buildShellInTempFolder, type ShellFolder } from '../../helpers/electron-shell-folder';

const ROOT = resolve(__dirname, '../../..');
const CONFIG_TEXT = readFileSync(join(ROOT, 'electron-builder.yml'), 'utf8');
const sqlFilesIn = (folder: string) => readdirSync(folder).filter((name) => name.endsWith('.sql'));
const fileNamesOf = (folder: string) => loadMigrations(folder).map((m) => `${String(m.version).padStart(4, '0')}_${m.name}.sql`);

let shell: ShellFolder;
const scratch = mkdtempSync(join(tmpdir(), 'rolloff-packaged-'));
beforeAll(async () => {
  shell = await buildShellInTempFolder();
});
afterAll(() => {
  shell?.remove();
  rmSync(scratch, { recursive: true, force: true });
});

/** What app.asar would hold for this configuration: the project's files that electron-builder's `files` matcher passes. */
async function packagedAppFolder(name: string, configText: string): Promise<string> {
  const configDir = join(scratch, `${name}-config`);
  mkdirSync(configDir);
  writeFileSync(join(configDir, 'electron-builder.yml'), configText);
  const config = await getConfig(configDir, join(configDir, 'electron-builder.yml'), null);
  const matchers = getFileMatchers(config, 'files', '', { macroExpander: (pattern) => pattern, customBuildOptions: {}, globalOutDir: join(configDir, 'out'), defaultSrc: shell.root });
  if (!matchers || matchers.length !== 1 || matchers[0].from !== shell.root) throw new Error(`expected one \`files\` set from the project folder, got ${matchers?.map(String).join('; ')}`);
  const passes = matchers[0].createFilter();
  const appDir = join(scratch, name);
  const copy = (folder: string) => {
    for (const entry of readdirSync(folder)) {
      const file = join(folder, entry);
      if (relative(shell.root, file) === 'node_modules') continue; // packages are not where the migrations are looked for
      const stat = statSync(file); // follows the shell folder's links to the project's migrations/
      if (!passes(file, stat)) continue;
      if (stat.isDirectory()) copy(file);
      else {
        const target = join(appDir, relative(shell.root, file));
        mkdirSync(dirname(target), { recursive: true });
        copyFileSync(file, target);
      }
    }
  };
  copy(shell.root);
  return appDir;
}

describe('where the stores find their migrations', () => {
  it('from the sources: the project folder', () => {
    expect(migrationsFolder('sqlite')).toBe(join(ROOT, 'migrations'));
    expect(migrationsFolder('postgres')).toBe(join(ROOT, 'migrations', 'postgres'));
  });

  it('from the bundled main process in the packaged app, as electron-builder.yml packs it', async () => {
    const appDir = await packagedAppFolder('app', CONFIG_TEXT);
    const bundleFolder = join(appDir, 'out', 'electron');
    expect(existsSync(join(bundleFolder, 'main.mjs'))).toBe(true);
    expect(migrationsFolder('sqlite', bundleFolder)).toBe(join(appDir, 'migrations'));
    expect(migrationsFolder('postgres', bundleFolder)).toBe(join(appDir, 'migrations', 'postgres'));
    expect(fileNamesOf(migrationsFolder('sqlite', bundleFolder))).toEqual(sqlFilesIn(join(ROOT, 'migrations')));
    expect(fileNamesOf(migrationsFolder('postgres', bundleFolder))).toEqual(sqlFilesIn(join(ROOT, 'migrations', 'postgres')));
  });

  it('a package without the migrations is refused with a clear error, not a file-system one', async () => {
    const withoutMigrations = CONFIG_TEXT.replace(/^ {2}- migrations\/\*\*\n/m, '');
    expect(withoutMigrations).not.toBe(CONFIG_TEXT);
    const appDir = await packagedAppFolder('no-migrations', withoutMigrations);
    const bundleFolder = join(appDir, 'out', 'electron');
    expect(() => migrationsFolder('postgres', bundleFolder)).toThrow(StoreUnavailableError);
    expect(() => migrationsFolder('sqlite', bundleFolder)).toThrow(/no migrations\/ folder .* in this folder or any above it/);
  });
});
