#!/usr/bin/env node
// `npm start`: builds the desktop shell and launches Electron. Where the
// Electron binary is missing (it cannot be downloaded on offline machines)
// this says so plainly and points to the headless web host instead.
import { existsSync, readFileSync } from 'node:fs';
import { spawn } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');

export function electronBinaryPath(projectRoot = root) {
  const packageDir = join(projectRoot, 'node_modules', 'electron');
  const pathFile = join(packageDir, 'path.txt');
  if (!existsSync(pathFile)) return undefined;
  const relative = readFileSync(pathFile, 'utf8').trim();
  const binary = join(packageDir, 'dist', relative);
  return relative && existsSync(binary) ? binary : undefined;
}

const MISSING_MESSAGE = `The Rolloff desktop shell needs the Electron binary, which is not installed here
(node_modules/electron/path.txt or node_modules/electron/dist is missing — the
electron package fetches it from the internet, which this machine cannot reach).

To run the desktop shell: on a machine with internet access run
    npm ci
    node node_modules/electron/install.js   (fetches the Electron binary)
    npx electron-builder install-app-deps   (rebuilds better-sqlite3 and serialport for Electron)
then npm start again.

Everything the window does also works in a browser through the headless host:
    npx rolloff serve            (then open the address it prints)
    npx rolloff serve --simulated  (with the simulated bench)
`;

async function main() {
  const binary = electronBinaryPath();
  if (!binary) {
    process.stderr.write(MISSING_MESSAGE);
    return 3;
  }
  const { register } = await import('tsx/esm/api');
  register();
  const { buildElectronShell } = await import('./build.ts');
  const { mainEntry } = await buildElectronShell();
  const child = spawn(binary, [mainEntry, ...process.argv.slice(2)], { stdio: 'inherit' });
  return await new Promise((resolve) => child.on('exit', (code, signal) => resolve(signal ? 1 : code ?? 0)));
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  process.exitCode = await main();
}
