/**
 * The real desktop shell, driven by Playwright's Electron support. It runs
 * where the Electron binary is installed; here (no internet, so no binary) it
 * is skipped and says why. The same renderer is covered in Chromium by
 * app.test.ts against `rolloff serve`.
 */
import { describe, expect, it } from 'vitest';
import { join, resolve } from 'node:path';
import { _electron as electron } from 'playwright-core';
// @ts-expect-error -- plain .mjs launcher without type declarations
import { electronBinaryPath } from '../../main/start.mjs';
import { buildShellInTempFolder } from '../helpers/electron-shell-folder';

const ROOT = resolve(__dirname, '../..');
const binary = (electronBinaryPath as (root: string) => string | undefined)(ROOT);
const SKIP_REASON = 'skipped: the Electron binary is not installed (node_modules/electron/dist is missing; fetch it with node node_modules/electron/install.js on a machine with internet access)';

if (!binary) console.warn(`test/e2e/electron.test.ts ${SKIP_REASON}`);

describe(binary ? 'the Electron shell' : `the Electron shell — ${SKIP_REASON}`, () => {
  it.skipIf(!binary)('opens one isolated window on its own scheme with the views and the preload bridge only', async () => {
    const shell = await buildShellInTempFolder();
    const app = await electron.launch({ executablePath: binary, args: [shell.mainEntry, '--db', join(shell.root, 'bench.sqlite')] });
    try {
      const window = await app.firstWindow();
      await window.waitForLoadState('domcontentloaded');
      // Served by the rolloff:// handler (main/renderer-protocol.ts), so the CSP's 'self' is this origin, not file://.
      expect(window.url()).toBe('rolloff://app/index.html');
      expect(await window.evaluate(() => ({ origin: location.origin, secure: isSecureContext }))).toEqual({ origin: 'rolloff://app', secure: true });
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
      shell.remove();
    }
  });
});
