/**
 * End to end in Debian's Chromium against the real `rolloff serve --simulated`
 * (real service, real SQLite file in a temp dir, simulated bench over TCP on
 * 127.0.0.1): pick a design, sweep, watch points and the gain-limit marker
 * arrive, stop and resume, then compare two runs. Screenshots go to
 * test/artifacts/ for a person to look at.
 *
 * The stage: inverting gain −RF/RN = −100 with a 1 MHz GBW op-amp; its
 * gain-limit point is near GBW/noise gain = 1 MHz/101 ≈ 9.9 kHz (DEVELOPERS.md "Theory",
 * "Theory the tool must get right"), inside the 100 Hz – 200 kHz sweep.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { Page } from 'playwright-core';
import { launchChromium } from './helpers/chromium';
import { requireTool } from '../helpers/required-tool';
import { startServe, type ServeProcess } from './helpers/serve-process';
import { CURVE_NAMES } from '../../app/contract/plot-palette';

const ARTIFACTS = resolve(__dirname, '../artifacts');

describe.skipIf(!requireTool('chromium'))('the window in Chromium against rolloff serve --simulated', () => {
  let serve: ServeProcess;
  let browser: Awaited<ReturnType<typeof launchChromium>>;
  let page: Page;
  const consoleErrors: string[] = [];

  beforeAll(async () => {
    mkdirSync(ARTIFACTS, { recursive: true });
    serve = await startServe(['--simulated', '--time-scale', '1']);
    browser = await launchChromium({ width: 1280, height: 800 });
    page = await browser.context.newPage();
    page.on('console', (message) => {
      // A 4xx reply is how the host refuses a plan while the user is still typing; the view shows it inline.
      if (message.type() === 'error' && !/status of 4\d\d/.test(message.text())) consoleErrors.push(message.text());
    });
    page.on('pageerror', (error) => consoleErrors.push(String(error)));
  });

  afterAll(async () => {
    await browser?.close();
    await serve?.stop();
  });

  const shot = (name: string) => page.screenshot({ path: join(ARTIFACTS, `e2e-${name}.png`) });
  const view = (key: string) => page.keyboard.press(`Alt+${key}`);

  it('shows the safety notice on first start and remembers that it was read', async () => {
    await page.goto(serve.url);
    const dialog = page.getByTestId('safety-dialog');
    await expect.poll(() => dialog.isVisible()).toBe(true);
    expect(await dialog.textContent()).toMatch(/maximum stimulus you set/);
    await shot('01-safety');
    await page.getByTestId('safety-ok').click();
    await page.reload();
    await page.locator('.nav-button').first().waitFor();
    expect(await page.getByTestId('safety-dialog').count()).toBe(0);
  });

  it('opens a design file, and refuses a bad one naming the part', async () => {
    await view('2');
    const fileInput = page.getByLabel('Open a design file');
    const design = {
      name: 'Follower with gain 2 (invented example)',
      input: 'in',
      output: 'out',
      parts: [
        { id: 'RG', type: 'resistor', nodes: ['inv', '0'], value: '10k' },
        { id: 'RF', type: 'resistor', nodes: ['inv', 'out'], value: '10k' },
        { id: 'U1', type: 'opamp', nodes: ['in', 'inv', 'out'], model: { openLoopGain: 1e5, gbw: 1e6 } },
      ],
    };
    await fileInput.setInputFiles({ name: 'follower.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(design)) });
    await expect.poll(() => page.getByTestId('design-name').inputValue()).toBe(design.name);
    await expect.poll(() => page.locator('[data-figure="passband"]').textContent()).toMatch(/^6\.0\d dB$/); // 20·log10(1 + RF/RG) = 6.02 dB, non-inverting gain (handbook formula)
    const bad = { ...design, parts: [{ ...design.parts[0], value: '-10k' }, ...design.parts.slice(1)] };
    await fileInput.setInputFiles({ name: 'bad.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(bad)) });
    await expect.poll(() => page.locator('.notice-error').last().textContent()).toMatch(/Opening bad\.json: .*RG/);
    await page.locator('.notice-error .notice-close').last().click();
  });

  it('makes a design from a template, shows its theory as you type, saves it and creates a build', async () => {
    await view('2');
    await page.getByTestId('template').selectOption('inverting-gain');
    await page.locator('input[data-param="rf"]').fill('100k');
    await page.getByTestId('make-template').click();
    await expect.poll(() => page.getByTestId('design-name').inputValue()).toBe('Inverting gain stage');
    const gainLimit = page.locator('[data-figure="gain-limit"]');
    // GBW / noise gain = 1 MHz / (1 + 100k/1k) ≈ 9.9 kHz (DEVELOPERS.md "Theory").
    await expect.poll(() => gainLimit.textContent()).toBe('9.9 kHz');
    const before = await gainLimit.textContent();
    // Editing a value re-computes theory in the window: RF 100k → 47k moves the gain-limit point up.
    await page.locator('input[data-part-input="RF value (Ω)"]').fill('47k');
    await expect.poll(() => gainLimit.textContent()).not.toBe(before);
    await page.locator('input[data-part-input="RF value (Ω)"]').fill('100k');
    await expect.poll(() => gainLimit.textContent()).toBe(before);
    // The template's parts have tolerances, so the theory plot shows the band: one legend entry for it, as in the records.
    const legendEntries = page.locator('[data-chart="gain"] .u-legend .u-series:visible');
    await expect.poll(() => legendEntries.filter({ hasText: CURVE_NAMES.toleranceBand }).count()).toBe(1);
    expect(await legendEntries.filter({ hasText: /Band (high|low)|lower edge/ }).count()).toBe(0);
    await page.getByTestId('design-name').fill('Gain −100 stage (invented example)');
    await page.getByTestId('save-design').click();
    await expect.poll(() => page.getByTestId('design-saved-state').textContent()).toMatch(/Saved as #1/);
    await page.getByTestId('build-label').fill('board A');
    await page.getByTestId('create-build').click();
    await expect.poll(() => page.locator('.notice-info').last().textContent()).toMatch(/Build "board A" created/);
    await shot('02-design');
  });

  it('sets the maximum stimulus and starts the simulated bench, labelled simulated', async () => {
    await view('1');
    await page.getByTestId('max-stimulus').fill('2');
    await page.getByRole('button', { name: 'Apply' }).click();
    await expect.poll(() => page.locator('.notice-info').last().textContent()).toMatch(/Maximum stimulus set to 2 Vpp/);
    await expect.poll(() => page.getByTestId('simulated-design').inputValue()).toBe('1');
    await page.getByTestId('start-simulated').click();
    await expect.poll(() => page.getByTestId('bench-chip').textContent(), { timeout: 20_000 }).toMatch(/3 instruments — SIMULATED/);
    await expect.poll(() => page.getByTestId('instruments').locator('tbody tr').count()).toBe(3);
    await expect.poll(() => page.getByTestId('traffic').locator('li').count()).toBeGreaterThan(0);
    await shot('03-bench');
  });

  it('runs a sweep: points arrive on the plot, the gain-limit marker appears; stop and resume finish it', async () => {
    await view('3');
    await page.getByTestId('sweep-from').fill('100');
    await page.getByTestId('sweep-to').fill('200k');
    await page.getByTestId('sweep-ppd').fill('8');
    await expect.poll(() => page.getByTestId('sweep-estimate').textContent()).toMatch(/points, about/);
    await page.getByTestId('sweep-start').click();
    const plot = page.locator('[data-testid="sweep-plot"] .bode');
    const measured = async () => Number(await plot.getAttribute('data-measured-points'));
    await expect.poll(measured, { timeout: 30_000 }).toBeGreaterThan(2);
    await expect.poll(() => plot.locator('[data-marker="gain-limit"]').first().textContent()).toMatch(/gain limit \(theory\) \d/);
    await shot('04-sweep-live');

    await page.getByTestId('sweep-stop').click();
    await expect.poll(() => page.getByTestId('run-status').textContent(), { timeout: 20_000 }).toBe('stopped');
    const atStop = await measured();
    await page.getByTestId('sweep-resume').click();
    await expect.poll(() => page.getByTestId('run-status').textContent(), { timeout: 60_000 }).toBe('done');
    await expect.poll(measured).toBeGreaterThan(atStop);
    // After the run the measured figures come back from the service and are marked too.
    await expect.poll(() => plot.locator('[data-marker="gain-limit"]').allTextContents(), { timeout: 10_000 }).toContainEqual(expect.stringMatching(/gain limit \(measured\)/));
    expect(await page.getByTestId('run-events').locator('li').count()).toBeGreaterThan(0);
    await shot('05-sweep-done');
  });

  it('compares two runs with the figure table and a difference plot', async () => {
    await page.getByTestId('sweep-ppd').fill('4');
    await page.getByTestId('sweep-start').click();
    await expect.poll(() => page.getByTestId('run-header').textContent(), { timeout: 10_000 }).toMatch(/^Run #2:/);
    // Pause and resume this one (the first run was stopped and resumed).
    await expect.poll(async () => Number(await page.locator('[data-testid="sweep-plot"] .bode').getAttribute('data-measured-points')), { timeout: 30_000 }).toBeGreaterThan(0);
    await page.getByTestId('sweep-pause').click();
    await expect.poll(() => page.getByTestId('run-status').textContent(), { timeout: 20_000 }).toBe('paused');
    await page.getByTestId('sweep-resume').click();
    await expect.poll(() => page.getByTestId('run-status').textContent(), { timeout: 60_000 }).toBe('done');
    await view('4');
    await expect.poll(() => page.locator('[data-pick-run]').count()).toBe(2);
    await page.getByTestId('history-search').fill('no such board');
    await expect.poll(() => page.getByTestId('history-runs').textContent()).toBe('No runs match.');
    await page.getByTestId('history-search').fill('board A');
    await expect.poll(() => page.locator('[data-pick-run]').count()).toBe(2);
    for (const box of await page.locator('[data-pick-run]').all()) await box.check();
    await expect.poll(() => page.getByTestId('picked-count').textContent()).toBe('2 picked');
    await shot('06-history');
    await page.getByTestId('compare-picked').click();
    const compare = page.locator('section[data-view="compare"]');
    await expect.poll(() => compare.getAttribute('data-compared-runs'), { timeout: 20_000 }).toBe('2');
    await expect.poll(() => page.getByTestId('compare-table').locator('tbody tr').count()).toBe(2);
    await page.getByTestId('compare-reference').selectOption({ index: 1 });
    await page.getByTestId('compare-run').click();
    const reference = await page.getByTestId('compare-reference').inputValue();
    await expect.poll(() => page.getByTestId('compare-difference-title').textContent()).toBe(`Difference from run #${reference}`);
    await shot('07-compare');
  });

  it('exports the picked runs as a CSV record and downloads it', async () => {
    await view('6');
    await page.getByTestId('record-format').selectOption('csv');
    const download = page.waitForEvent('download');
    await page.getByTestId('record-export').click();
    const file = await download;
    expect(file.suggestedFilename()).toMatch(/\.csv$/);
    const text = await new Promise<string>((resolvePromise, reject) => {
      file.createReadStream().then((stream) => {
        const chunks: Buffer[] = [];
        stream.on('data', (c: Buffer) => chunks.push(c));
        stream.on('end', () => resolvePromise(Buffer.concat(chunks).toString('utf8')));
        stream.on('error', reject);
      }, reject);
    });
    // RFC 4180 CSV with units in the header names (the record module's format).
    expect(text).toMatch(/frequency_hz/);
    expect(text).toMatch(/gain_db/);
    expect(text.split('\r\n').length).toBeGreaterThan(20);
    await shot('08-record');
  });

  it('runs a DC transfer sweep of the log stage and shows the fitted diode parameters', async () => {
    await view('2');
    await page.getByTestId('template').selectOption('log-stage');
    await page.getByTestId('make-template').click();
    await expect.poll(() => page.getByTestId('design-name').inputValue()).toBe('Diode-feedback log stage');
    await page.getByTestId('build-label').fill('log board');
    await page.getByTestId('create-build').click();
    await expect.poll(() => page.locator('.notice-info').last().textContent()).toMatch(/Build "log board" created/);
    await view('1');
    await expect.poll(() => page.getByTestId('simulated-design').locator('option').count()).toBe(2);
    await page.getByTestId('simulated-design').selectOption({ label: 'Diode-feedback log stage (#2)' });
    await page.getByTestId('start-simulated').click();
    await expect.poll(() => page.getByTestId('simulated-status').textContent(), { timeout: 20_000 }).toMatch(/Diode-feedback log stage/);
    await view('3');
    await page.getByTestId('sweep-build').selectOption({ label: 'Diode-feedback log stage — log board (#2)' });
    await page.locator('select[name="kind"]').selectOption('dc');
    await page.locator('select[name="measurement"]').selectOption('meter');
    await page.getByTestId('sweep-from').fill('1m');
    await page.getByTestId('sweep-to').fill('1');
    await page.getByTestId('sweep-ppd').fill('4');
    await expect.poll(() => page.getByTestId('sweep-estimate').textContent()).toMatch(/points, about/);
    await page.getByTestId('sweep-start').click();
    await expect.poll(() => page.getByTestId('run-header').textContent(), { timeout: 10_000 }).toMatch(/^Run #3:/);
    await expect.poll(() => page.getByTestId('run-status').textContent(), { timeout: 60_000 }).toBe('done');
    const figures = page.getByTestId('run-figures');
    await expect.poll(() => figures.textContent(), { timeout: 10_000 }).toMatch(/Diode ideality factor n/);
    // The simulated diode has n = 1 (the template's default); the fit should find it within a few per cent.
    const n = Number(/Diode ideality factor n\s*([\d.]+)/.exec((await figures.textContent()) ?? '')?.[1]);
    expect(Math.abs(n - 1)).toBeLessThan(0.05);
    await shot('10-dc-sweep');
  });

  it('marks distorted points when a fixed stimulus drives the output into the rails', async () => {
    await view('1');
    await page.getByTestId('simulated-design').selectOption({ label: 'Gain −100 stage (invented example) (#1)' });
    await page.getByTestId('start-simulated').click();
    await expect.poll(() => page.getByTestId('simulated-status').textContent(), { timeout: 20_000 }).toMatch(/Gain −100 stage/);
    await view('3');
    await page.getByTestId('sweep-build').selectOption({ label: 'Gain −100 stage (invented example) — board A (#1)' });
    await page.locator('select[name="kind"]').selectOption('ac');
    await page.locator('select[name="measurement"]').selectOption('scope');
    await page.locator('select[name="amplitude-mode"]').selectOption('fixed');
    // 2 Vpp in × 100 = 200 Vpp wanted; the ±12 V rails clip it (the design's op-amp model).
    await page.getByTestId('sweep-amplitude').fill('2');
    await page.getByTestId('sweep-from').fill('100');
    await page.getByTestId('sweep-to').fill('1k');
    await page.getByTestId('sweep-ppd').fill('3');
    await expect.poll(() => page.getByTestId('sweep-estimate').textContent()).toMatch(/points, about/);
    await page.getByTestId('sweep-start').click();
    await expect.poll(() => page.getByTestId('run-header').textContent(), { timeout: 10_000 }).toMatch(/^Run #4:/);
    await expect.poll(() => page.getByTestId('run-status').textContent(), { timeout: 60_000 }).toMatch(/done|failed/);
    const plot = page.locator('[data-testid="sweep-plot"] .bode');
    await expect.poll(async () => Number(await plot.getAttribute('data-distorted-points'))).toBeGreaterThan(0);
    await shot('11-distorted');
  });

  it('is usable from the keyboard and shows the cautions in About', async () => {
    await view('0');
    const about = page.locator('section[data-view="about"]');
    expect(await about.isVisible()).toBe(true);
    expect(await about.textContent()).toMatch(/simulated/);
    // Tab order starts at the view navigation, in the order the views are listed.
    await page.reload();
    await page.locator('.nav-button').first().waitFor();
    await page.keyboard.press('Tab');
    expect(await page.evaluate(() => (document.activeElement as HTMLElement).dataset.view)).toBe('bench');
    await page.keyboard.press('Tab');
    expect(await page.evaluate(() => (document.activeElement as HTMLElement).dataset.view)).toBe('design');
    await page.keyboard.press('Enter');
    await expect.poll(() => page.locator('section[data-view="design"]').isVisible()).toBe(true);
    await view('1');
    // Connecting to an address where nothing answers gives a clear error, not a hang or a stack trace.
    await view('1');
    await page.locator('select[name="role"]').selectOption('meter');
    await page.locator('input[name="address"]').fill('tcp://127.0.0.1:1');
    await page.getByRole('button', { name: 'Connect', exact: true }).click();
    await expect.poll(() => page.locator('.notice-error').last().textContent(), { timeout: 20_000 }).toMatch(/^Connecting: .*127\.0\.0\.1:1/);
    expect(await page.locator('.notice-error').last().textContent()).not.toMatch(/\bat \w+ \(/);
    // The profile checker from the Bench view: the simulated scope, disconnected first (a check opens its own link).
    const status = (await page.getByTestId('simulated-status').textContent()) ?? '';
    const scopeAddress = /scope at (tcp:\/\/\S+?)(,|$)/.exec(status)?.[1];
    expect(scopeAddress, status).toBeDefined();
    const scopeRow = page.getByTestId('instruments').locator('tr', { hasText: scopeAddress! });
    if ((await scopeRow.count()) > 0) await scopeRow.getByRole('button', { name: 'Disconnect' }).click();
    await expect.poll(() => page.getByTestId('instruments').locator('tr', { hasText: scopeAddress! }).count()).toBe(0);
    await page.locator('select[name="role"]').selectOption('scope');
    await page.locator('input[name="address"]').fill(scopeAddress!);
    await page.getByTestId('check-profile').click();
    await expect.poll(() => page.getByTestId('profile-check').locator('tr').count(), { timeout: 30_000 }).toBeGreaterThan(5);
    expect(await page.getByTestId('profile-check-title').textContent()).toMatch(/scpi-scope \(scope\)/);
    // The simulated scope speaks the shipped profile: every operation accepted (outcome column).
    const outcomes = await page.getByTestId('profile-check').locator('tr td:nth-child(2)').allTextContents();
    expect(new Set(outcomes)).toEqual(new Set(['accepted']));
    await shot('08b-profile-check');
    // Every view fits 1280×800 without sideways scrolling.
    for (const key of ['1', '2', '3', '4', '5', '6', '0']) {
      await view(key);
      const overflow = await page.evaluate(() => {
        const host = document.getElementById('view-host')!;
        return { page: document.documentElement.scrollWidth - window.innerWidth, view: host.scrollWidth - host.clientWidth };
      });
      expect(overflow, `view Alt+${key}`).toEqual({ page: 0, view: 0 });
    }
    await view('1');
    await shot('09-bench-end');
    expect(consoleErrors).toEqual([]);
  });
});
