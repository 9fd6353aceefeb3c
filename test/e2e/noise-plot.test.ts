/**
 * A noise run in the window, in Debian's Chromium against the real
 * `rolloff serve --simulated --circuit-noise`: the run is started through the
 * HTTP API and opened from the History view while it measures; the Sweep
 * view's plot fills with the measured density over the computed one on
 * log-log axes (uPlot's own scale kinds read back: distr 3 is logarithmic),
 * and the figures show the measured and computed noise under the table's names.
 * The canvas is read back to see both curves were drawn in their colours.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { Page } from 'playwright-core';
import { launchChromium } from './helpers/chromium';
import { requireTool } from '../helpers/required-tool';
import { callService, startServe, type ServeProcess } from './helpers/serve-process';
import type { NoiseRunDetail, RunSummary } from '../../app/contract/contract';
import { FIGURE_NAMES } from '../../app/contract/vocabulary';
import { CURVE_NAMES, PLOT_PALETTE } from '../../app/contract/plot-palette';
import { NOISE_COLORS } from '../../renderer/plot/noise-plot';
import { noiseRequest, noisyGain1000 } from '../integration/noise/helpers';

const ARTIFACTS = resolve(__dirname, '../artifacts');

/** Pixels of the chart's canvas within a small distance of an RGB colour. */
async function pixelsOfColour(page: Page, hex: string): Promise<number> {
  return page.evaluate((colour) => {
    const canvas = document.querySelector<HTMLCanvasElement>('[data-testid="noise-plot"] canvas');
    if (!canvas) return -1;
    const { data } = canvas.getContext('2d')!.getImageData(0, 0, canvas.width, canvas.height);
    const [r, g, b] = [1, 3, 5].map((i) => parseInt(colour.slice(i, i + 2), 16));
    let count = 0;
    for (let i = 0; i < data.length; i += 4) if (Math.abs(data[i] - r) + Math.abs(data[i + 1] - g) + Math.abs(data[i + 2] - b) < 40 && data[i + 3] > 200) count++;
    return count;
  }, hex);
}

describe.skipIf(!requireTool('chromium'))('a noise run in the window', () => {
  let serve: ServeProcess;
  let browser: Awaited<ReturnType<typeof launchChromium>>;
  let page: Page;
  const consoleErrors: string[] = [];

  beforeAll(async () => {
    mkdirSync(ARTIFACTS, { recursive: true });
    serve = await startServe(['--simulated', '--time-scale', '2', '--circuit-noise', '--measurement-noise', '0', '--max-stimulus', '1']);
    browser = await launchChromium({ width: 1280, height: 900 });
    page = await browser.context.newPage();
    page.on('console', (message) => {
      if (message.type() === 'error') consoleErrors.push(message.text());
    });
    page.on('pageerror', (error) => consoleErrors.push(String(error)));
  });

  afterAll(async () => {
    await browser?.close();
    await serve?.stop();
  });

  it('plots the measured density against the computed one, log-log, live and when done', async () => {
    const design = await callService<{ id: number }>(serve, 'saveDesign', [noisyGain1000()]);
    const build = await callService<{ id: number }>(serve, 'createBuild', [{ designId: design.id, label: 'noise board (invented)', notes: '', actualValues: {} }]);
    await callService(serve, 'startSimulatedBench', [design.id]);
    const run = await callService<RunSummary>(serve, 'startNoiseRun', [noiseRequest(build.id, { records: 12, segmentLength: 4096, fromHz: 200, toHz: 20e3 })]);
    expect(run.kind).toBe('noise');

    await page.goto(serve.url);
    await page.getByTestId('safety-ok').click();
    await page.keyboard.press('Alt+4');
    await page.locator(`tr[data-run="${run.id}"] button`, { hasText: 'Open' }).click();
    const plot = page.getByTestId('noise-plot');
    await plot.waitFor();
    expect(await plot.getAttribute('data-x-distr')).toBe('3');
    expect(await plot.getAttribute('data-y-distr')).toBe('3');
    // Records arrive while the view is open: the plot fills before the run ends.
    await expect.poll(async () => Number(await plot.getAttribute('data-bins')), { timeout: 60_000 }).toBeGreaterThan(0);
    await expect.poll(() => page.getByTestId('run-status').textContent(), { timeout: 120_000 }).toBe('done');
    const detail = await callService<NoiseRunDetail>(serve, 'getNoiseRun', [run.id]);
    await expect.poll(async () => Number(await plot.getAttribute('data-bins'))).toBe(detail.density.frequencyHz.length);
    expect(await page.getByTestId('sweep-progress').textContent()).toMatch(/^Records: 12 planned/);
    const legend = await plot.locator('.u-legend').innerText(); // what is shown: the lower edge's entry is hidden
    for (const name of [CURVE_NAMES.theory, CURVE_NAMES.measured, CURVE_NAMES.measuredInterval]) expect(legend).toContain(name);
    expect(legend).not.toContain('lower edge'); // one interval, one legend entry
    expect([NOISE_COLORS.computed, NOISE_COLORS.measured]).toEqual([PLOT_PALETTE.theory, PLOT_PALETTE.measured]);
    // The figures shown are those of the finished run: every record, not the ones there were when the view last read.
    await expect.poll(() => page.getByTestId('run-figures').textContent()).toContain(`from ${detail.figures.noise!.recordsUsed} records`);
    expect(detail.figures.noise!.recordsUsed).toBe(12);
    const figures = await page.getByTestId('run-figures').textContent();
    for (const name of [FIGURE_NAMES.noiseMeasuredRmsV, FIGURE_NAMES.noiseComputedRmsV, FIGURE_NAMES.noiseShareWithin95]) expect(figures).toContain(name);
    await page.screenshot({ path: join(ARTIFACTS, 'e2e-noise-plot.png') });
    expect(await pixelsOfColour(page, NOISE_COLORS.measured)).toBeGreaterThan(200);
    expect(await pixelsOfColour(page, NOISE_COLORS.computed)).toBeGreaterThan(200);
    expect(consoleErrors).toEqual([]);
  });
});
