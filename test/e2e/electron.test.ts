/**
 * The real desktop shell, driven by Playwright's Electron support. It runs
 * where the Electron binary is installed; here (no internet, so no binary) it
 * is skipped and says why. The same renderer is covered in Chromium by
 * app.test.ts against `rolloff serve`.
 */
import { describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { _electron as electron } from 'playwright-core';
// @ts-expect-error -- plain .mjs launcher without type declarations
import { electronBinaryPath } from '../../main/start.mjs';
import { buildElectronShell } from '../../main/build';

const ROOT = resolve(__dirname, '../..');
const binary = (electronBinaryPath as (root: string) => string | undefined)(ROOT);
const SKIP_REASON = 'skipped: the Electron binary is not installed (node_modules/electron/dist is missing; fetch it with node node_modules/electron/install.js on a machine with internet access)';

if (!binary) console.warn(`test/e2e/electron.test.ts ${SKIP_REASON}`);

describe(binary ? 'the Electron shell' : `the Electron shell — ${SKIP_REASON}`, () => {
  it.skipIf(!binary)('opens one isolated window with the views and the preload bridge only', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'rolloff-electron-e2e-'));
    const { mainEntry } = await buildElectronShell(join(dir, 'electron'));
    const app = await electron.launch({ executablePath: binary, args: [mainEntry, '--db', join(dir, 'bench.sqlite')] });
    try {
      const window = await app.firstWindow();
      await window.getByTestId('safety-ok').click();
      await window.locator('.nav-button').first().waitFor();
      expect(await window.locator('.nav-button').count()).toBe(7);
      const exposure = await window.evaluate(() => ({
        bridge: Object.keys((window as unknown as { rolloff: object }).rolloff).sort(),
        require: typeof (window as unknown as { require?: unknown }).require,
        process: typeof (window as unknown as { process?: unknown }).process,
      }));
      expect(exposure).toEqual({ bridge: ['call', 'on'], require: 'undefined', process: 'undefined' });
      await window.keyboard.press('Alt+2');
      await expect.poll(() => window.getByTestId('template').locator('option').count()).toBeGreaterThan(3);
      await window.screenshot({ path: join(ROOT, 'test/artifacts/electron-design.png') });
    } finally {
      await app.close();
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
