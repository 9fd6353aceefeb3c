/**
 * `npm start` where the Electron binary is missing: a plain message that
 * names the fix and the headless host, and a non-zero exit. (Where the binary
 * exists, test/e2e/electron.test.ts drives the real shell instead.)
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { resolve } from 'node:path';
// @ts-expect-error -- plain .mjs launcher without type declarations
import { electronBinaryPath } from '../../../main/start.mjs';

const ROOT = resolve(__dirname, '../../..');
const binary = (electronBinaryPath as (root: string) => string | undefined)(ROOT);

describe('npm start', () => {
  it.skipIf(binary !== undefined)('says plainly that the Electron binary is missing and points to rolloff serve', () => {
    const result = spawnSync(process.execPath, ['main/start.mjs'], { cwd: ROOT, encoding: 'utf8', timeout: 20_000 });
    expect(result.status).toBe(3);
    expect(result.stderr).toMatch(/needs the Electron binary/);
    expect(result.stderr).toMatch(/npx electron-builder install-app-deps/);
    expect(result.stderr).toMatch(/npx rolloff serve/);
    expect(result.stdout).toBe('');
  });

  it('finds no binary in a folder without node_modules/electron', () => {
    expect((electronBinaryPath as (root: string) => string | undefined)('/nonexistent-rolloff-root')).toBeUndefined();
  });
});
