/**
 * Debian's Chromium driven by playwright-core, with the flags the project
 * uses everywhere (DEVELOPERS.md "Tools the tests use") and a fresh profile per launch
 * so first-start behaviour (the safety notice) is seen every time.
 */
import { chromium, type BrowserContext } from 'playwright-core';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

import { REQUIRED_TOOLS } from '../../helpers/required-tool';

export const CHROMIUM_PATH = REQUIRED_TOOLS.chromium.program;
export const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
];

export async function launchChromium(viewport = { width: 1280, height: 800 }): Promise<{ context: BrowserContext; close(): Promise<void> }> {
  const profileDir = mkdtempSync(join(tmpdir(), 'rolloff-chromium-'));
  const context = await chromium.launchPersistentContext(profileDir, {
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: CHROMIUM_ARGS,
    viewport,
    acceptDownloads: true,
  });
  return {
    context,
    async close() {
      await context.close();
      rmSync(profileDir, { recursive: true, force: true });
    },
  };
}
