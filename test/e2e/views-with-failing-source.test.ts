/**
 * A view that loads several lists keeps working when one of them fails: the
 * saved designs cannot be read (one stored design's JSON is damaged in the real
 * SQLite file, so listDesigns fails), yet the Design view still offers the
 * templates, the Sweep view still lists the builds and History still lists the
 * runs; each says beside the failed part what could not be loaded.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import Database from 'better-sqlite3';
import type { Page } from 'playwright-core';
import { launchChromium } from './helpers/chromium';
import { callService, startServe, type ServeProcess } from './helpers/serve-process';
import { requireTool } from '../helpers/required-tool';
import { makeDesignFromTemplate } from '../../app/circuit';

describe.skipIf(!requireTool('chromium'))('views with one failing source', () => {
  let serve: ServeProcess;
  let browser: Awaited<ReturnType<typeof launchChromium>>;
  let page: Page;

  beforeAll(async () => {
    serve = await startServe(['--simulated', '--time-scale', '4', '--max-stimulus', '1']);
    const saved = await callService(serve, 'saveDesign', [{ ...makeDesignFromTemplate('inverting-gain', { rf: 100_000 }), name: 'Gain −100 (invented example)' }]) as { id: number };
    await callService(serve, 'createBuild', [{ designId: saved.id, label: 'board A (invented)' }]);
    // Damage the stored design as a bad copy or a foreign writer might: the row stays, its JSON no longer parses.
    const db = new Database(serve.dbPath);
    db.prepare('UPDATE designs SET design_json = ? WHERE id = ?').run('{ damaged', saved.id);
    db.close();
    browser = await launchChromium();
    page = await browser.context.newPage();
    await page.goto(serve.url);
    await page.getByTestId('safety-ok').click();
  });

  afterAll(async () => {
    await browser?.close();
    await serve?.stop();
  });

  it('the Design view still offers the templates and says the saved designs could not be loaded', async () => {
    await page.keyboard.press('Alt+2');
    await expect.poll(() => page.getByTestId('saved-designs-failure').textContent()).toMatch(/^The saved designs could not be loaded: /);
    expect(await page.getByTestId('template').locator('option').count()).toBeGreaterThan(0);
  });

  it('the Sweep view still lists the build, without its design\'s name', async () => {
    await page.keyboard.press('Alt+3');
    await expect.poll(() => page.getByTestId('design-names-failure').textContent()).toMatch(/^The design names could not be loaded: /);
    expect(await page.getByTestId('builds-failure').isVisible()).toBe(false);
    await expect.poll(() => page.getByTestId('sweep-build').locator('option').allTextContents()).toEqual(['design #1 — board A (invented) (#1)']);
  });

  it('History still lists the runs and says the designs and builds could not be loaded', async () => {
    await page.keyboard.press('Alt+4');
    await expect.poll(() => page.getByTestId('history-designs-failure').textContent()).toMatch(/^The designs and builds could not be loaded: /);
    expect(await page.getByTestId('runs-failure').isVisible()).toBe(false);
    await expect.poll(() => page.getByTestId('history-runs').textContent()).toMatch(/No runs match\./);
  });
});
