/**
 * The desktop shell's main process, as esbuild bundles it (out/electron/main.mjs,
 * in a folder laid out like the project and the packaged app), opens a lab
 * store: `--db postgres://…` migrates a throw-away PostgreSQL database and a
 * design saved through the window's IPC lands in it. The bundle sits at a
 * different depth than the sources, so this catches a migrations folder looked
 * up relative to the wrong file. Runs on the recording stand-in for the
 * "electron" package (the Electron binary cannot be installed here).
 * Expected values: the project's own migration files (one schema_migrations row
 * per file in migrations/postgres/) — common practice, no source.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { CALL_CHANNEL } from '../../../main/channels';
import { buildShellInTempFolder, type ShellFolder } from '../../helpers/electron-shell-folder';
import { postgresAvailable, startPostgresCluster, type PostgresCluster } from '../../helpers/postgres-cluster';
import { electronJournal } from '../../unit/main/helpers/electron-stand-in';

const POSTGRES_MIGRATION_FILES = readdirSync(resolve(__dirname, '../../../migrations/postgres')).filter((name) => name.endsWith('.sql'));
const hasPostgres = postgresAvailable();

async function until(condition: () => boolean, what: string): Promise<void> {
  for (let i = 0; i < 800 && !condition(); i++) await new Promise((r) => setTimeout(r, 25));
  if (!condition()) throw new Error(`timed out waiting for ${what}; calls: ${electronJournal().calls.join(', ')}`);
}

describe.skipIf(!hasPostgres)('the bundled desktop main process on a PostgreSQL store', () => {
  let cluster: PostgresCluster;
  let shell: ShellFolder | undefined;
  beforeAll(async () => {
    cluster = await startPostgresCluster();
  });
  afterAll(() => {
    shell?.remove();
    cluster?.remove();
  });

  it('migrates the lab database and stores what the window saves', async () => {
    shell = await buildShellInTempFolder({ mainAlias: { electron: join(__dirname, '../../unit/main/helpers/electron-stand-in.ts') } });
    const journal = electronJournal();
    // The window's settings file lives here (unused: --db names the store, and wins over a saved choice).
    journal.userDataPath = join(shell.root, 'user-data');
    const errors: string[] = [];
    const writeError = process.stderr.write.bind(process.stderr);
    process.stderr.write = ((chunk: string | Uint8Array, ...rest: unknown[]) => {
      errors.push(String(chunk));
      return (writeError as (...args: unknown[]) => boolean)(chunk, ...rest);
    }) as typeof process.stderr.write;
    const argv = process.argv;
    process.argv = [...argv, '--db', cluster.urlWithPassword];
    try {
      await import(pathToFileURL(join(shell.outDir, 'main.mjs')).href);
      journal.becomeReady();
      await until(() => journal.loadedUrls.length > 0 || journal.exitCode !== undefined, 'the window to load or the app to exit');
    } finally {
      process.argv = argv;
      process.stderr.write = writeError;
    }
    expect(journal.exitCode, errors.join('')).toBeUndefined();
    expect(journal.loadedUrls).toEqual(['rolloff://app/index.html']);

    const versions = cluster.sql('SELECT version FROM schema_migrations ORDER BY version;', cluster.database).trim().split('\n').map(Number);
    expect(versions).toEqual(POSTGRES_MIGRATION_FILES.map((_, index) => index + 1));

    const call = journal.ipcHandlers.get(CALL_CHANNEL)!;
    const page = { senderFrame: { url: 'rolloff://app/index.html' } };
    const template = (await call(page, 'listTemplates', [])) as { ok: boolean; result: Array<{ id: string }> };
    const made = (await call(page, 'makeTemplate', [template.result[0].id, {}])) as { ok: boolean; result: { name?: string } };
    expect(made.ok).toBe(true);
    const saved = (await call(page, 'saveDesign', [made.result])) as { ok: boolean; result?: { id: number }; error?: unknown };
    expect(saved.ok, JSON.stringify(saved.error)).toBe(true);
    expect(cluster.sql(`SELECT count(*) FROM designs WHERE id = ${saved.result!.id};`, cluster.database).trim()).toBe('1');

    journal.app.emit('before-quit', { preventDefault: () => {} });
    await until(() => journal.calls.includes('app.quit'), 'the app to quit after closing the store');
  });
});
