/**
 * The Bench view on a minimal machine: `rolloff serve` runs with no udevadm on
 * PATH (as in containers and minimal installs) and with a profile folder that
 * cannot be loaded (a profile reusing a shipped id). The port list still shows
 * what the kernel offers and says what it could not learn, the profile failure
 * is reported beside the profile field, and the saved designs and the
 * simulated bench still work: one failing source never blocks the others.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { copyFileSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import type { Page } from 'playwright-core';
import { launchChromium } from './helpers/chromium';
import { callService, startServe, type ServeProcess } from './helpers/serve-process';
import { pathWithout, requireTool } from '../helpers/required-tool';
import { portsTestTree } from '../helpers/fake-sysfs';
import { makeDesignFromTemplate } from '../../app/circuit';

const ROOT = resolve(__dirname, '../..');

describe.skipIf(!requireTool('chromium'))('the Bench view without udevadm, with one failing source', () => {
  const sysfs = portsTestTree();
  const profiles = mkdtempSync(join(tmpdir(), 'rolloff-bad-profiles-'));
  let serve: ServeProcess;
  let browser: Awaited<ReturnType<typeof launchChromium>>;
  let page: Page;

  beforeAll(async () => {
    // Same id as the shipped generator profile: the profile list is refused as a whole.
    copyFileSync(join(ROOT, 'app/bench/profiles/scpi-generator.json'), join(profiles, 'copy-of-generator.json'));
    serve = await startServe(['--simulated', '--time-scale', '4', '--max-stimulus', '1'], { env: { PATH: pathWithout(['udevadm']), ROLLOFF_SYSFS_ROOT: sysfs.root, ROLLOFF_PROFILE_DIR: profiles } });
    await callService(serve, 'saveDesign', [{ ...makeDesignFromTemplate('inverting-gain', { rf: 100_000 }), name: 'Gain −100 (invented example)' }]);
    browser = await launchChromium();
    page = await browser.context.newPage();
    await page.goto(serve.url);
    await page.getByTestId('safety-ok').click();
    await page.keyboard.press('Alt+1');
  });

  afterAll(async () => {
    await browser?.close();
    await serve?.stop();
    sysfs.remove();
    rmSync(profiles, { recursive: true, force: true });
  });

  it('lists the kernel\'s ports and says in one line what it could not learn', async () => {
    await expect.poll(() => page.locator('#port-list option').evaluateAll((options) => options.map((o) => (o as HTMLOptionElement).value))).toEqual(['ASRL/dev/ttyACM0::INSTR', 'ASRL/dev/ttyS0::INSTR', 'ASRL/dev/ttyUSB0::INSTR', 'USB0::0x1209::0x0003::TEST-TMC-9::INSTR']);
    await expect.poll(() => page.getByTestId('ports-note').textContent()).toMatch(/^udevadm not found, so ports were read from the kernel/);
    expect(await page.getByTestId('ports-failure').isVisible()).toBe(false);
  });

  it('reports the failing profiles beside the profile field, not as a dead view', async () => {
    await expect.poll(() => page.getByTestId('profiles-failure').textContent()).toMatch(/^The instrument profiles could not be loaded: .*copy-of-generator\.json.*already used/);
    expect(await page.locator('.notice-error').count()).toBe(0);
  });

  it('still lists the saved designs and starts the simulated bench', async () => {
    await expect.poll(() => page.getByTestId('simulated-design').locator('option').allTextContents()).toEqual(['Gain −100 (invented example) (#1)']);
    expect(await page.getByTestId('designs-failure').isVisible()).toBe(false);
    await page.getByTestId('start-simulated').click();
    await expect.poll(() => page.getByTestId('instruments').locator('tbody tr').count(), { timeout: 20_000 }).toBe(3);
    await expect.poll(() => page.getByTestId('simulated-status').textContent()).toMatch(/^Running \(simulated\)/);
  });
});
