/**
 * Builds the desktop shell into a temp folder laid out as the project and the
 * packaged app are: out/electron/ beside migrations/ and node_modules/ (the
 * bundled main process finds the migrations by walking up from itself, and
 * loads npm packages, kept external, from node_modules).
 */
import { mkdtempSync, rmSync, symlinkSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { buildElectronShell, type ElectronBuildOptions } from '../../main/build';

const ROOT = resolve(__dirname, '../..');

export interface ShellFolder {
  root: string;
  /** root/out/electron: main.mjs, main.cjs, preload.cjs, renderer/. */
  outDir: string;
  mainEntry: string;
  remove(): void;
}

export async function buildShellInTempFolder(options: ElectronBuildOptions = {}): Promise<ShellFolder> {
  const root = mkdtempSync(join(tmpdir(), 'rolloff-shell-'));
  for (const name of ['migrations', 'node_modules']) symlinkSync(join(ROOT, name), join(root, name), 'dir');
  const outDir = join(root, 'out', 'electron');
  const { mainEntry } = await buildElectronShell(outDir, options);
  return { root, outDir, mainEntry, remove: () => rmSync(root, { recursive: true, force: true }) };
}
