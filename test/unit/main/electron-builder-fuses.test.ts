/**
 * The desktop packages ship with Electron's fuses set: electron-builder.yml is
 * read by electron-builder's own loader and checked against its own schema
 * (so a misspelt fuse is an error, not a silent default), then each fuse is
 * compared with what it must be. Which fuses and why: Electron's "Electron
 * Fuses" tutorial and security checklist (electronjs.org/docs/latest/tutorial/fuses,
 * .../tutorial/security); electron-builder's electronFuses option (electron.build,
 * "Adding Electron Fuses"), present since electron-builder 25 — package.json has 26.
 */
import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { getConfig, validateConfiguration } from 'app-builder-lib/out/util/config/config';
import { DebugLogger } from 'builder-util';

const ROOT = resolve(__dirname, '../../..');
const CONFIG_TEXT = readFileSync(join(ROOT, 'electron-builder.yml'), 'utf8');

const REQUIRED_FUSES = {
  runAsNode: false,
  enableNodeOptionsEnvironmentVariable: false,
  enableNodeCliInspectArguments: false,
  enableEmbeddedAsarIntegrityValidation: true,
  onlyLoadAppFromAsar: true,
  // The window is served on rolloff:// (main/renderer-scheme.ts), so file:// needs none of its old extras.
  grantFileProtocolExtraPrivileges: false,
} as const;

/** What is wrong with the fuses of an electron-builder.yml, as electron-builder reads it; [] when nothing. */
async function fuseProblems(configText: string): Promise<string[]> {
  const dir = mkdtempSync(join(tmpdir(), 'rolloff-builder-config-'));
  try {
    writeFileSync(join(dir, 'electron-builder.yml'), configText);
    const config = await getConfig(dir, join(dir, 'electron-builder.yml'), null);
    try {
      await validateConfiguration(config, new DebugLogger(false));
    } catch (error) {
      return [`electron-builder refuses the configuration: ${(error as Error).message.split('\n').slice(0, 3).join(' ')}`];
    }
    const problems: string[] = [];
    if (config.asar === false) problems.push('asar is off, so onlyLoadAppFromAsar would leave the app nothing to load');
    const fuses = (config.electronFuses ?? {}) as Record<string, unknown>;
    for (const [name, wanted] of Object.entries(REQUIRED_FUSES)) {
      if (!(name in fuses)) problems.push(`${name} is missing (must be ${wanted})`);
      else if (fuses[name] !== wanted) problems.push(`${name} is ${String(fuses[name])} (must be ${wanted})`);
    }
    return problems;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}


describe('electron-builder.yml', () => {
  it('sets every fuse as required, in a configuration electron-builder accepts', async () => {
    expect(await fuseProblems(CONFIG_TEXT)).toEqual([]);
  });

  it('the check fails when a fuse is missing, flipped or misspelt', async () => {
    const without = CONFIG_TEXT.replace(/^ {2}runAsNode: false.*\n/m, '');
    expect(without).not.toBe(CONFIG_TEXT);
    expect(await fuseProblems(without)).toEqual(['runAsNode is missing (must be false)']);

    const flipped = CONFIG_TEXT.replace(/onlyLoadAppFromAsar: true/, 'onlyLoadAppFromAsar: false');
    expect(await fuseProblems(flipped)).toEqual(['onlyLoadAppFromAsar is false (must be true)']);

    const misspelt = CONFIG_TEXT.replace(/enableNodeCliInspectArguments:/, 'enableNodeCliInspectArgs:');
    expect((await fuseProblems(misspelt)).join(' ')).toMatch(/electron-builder refuses the configuration/);

    const noFuses = CONFIG_TEXT.replace(/^electronFuses:\n(?: {2}.*\n)+/m, '');
    expect(await fuseProblems(noFuses)).toHaveLength(Object.keys(REQUIRED_FUSES).length);

    const noAsar = CONFIG_TEXT.replace(/^asar: true$/m, 'asar: false');
    expect(await fuseProblems(noAsar)).toEqual(['asar is off, so onlyLoadAppFromAsar would leave the app nothing to load']);
  });
});
