/**
 * The simulated low-pass bench the plot and count tests share, behind a real
 * `rolloff serve --simulated`: inverting low-pass, RN 1 kΩ, RF 10 kΩ, CF 15 nF,
 * −3 dB at 1/(2π·RF·CF) ≈ 1.06 kHz (handbook single-pole corner), so a sweep
 * of 100 Hz – 20 kHz with refinement on adds points around it. The window is
 * opened in Chromium with the safety notice read.
 */
import { expect } from 'vitest';
import type { Page } from 'playwright-core';
import { makeDesignFromTemplate } from '../../../app/circuit';
import { launchChromium } from './chromium';
import { callService, startServe, type ServeProcess } from './serve-process';

export interface LowPassBench {
  serve: ServeProcess;
  buildId: number;
  browser: Awaited<ReturnType<typeof launchChromium>>;
  page: Page;
  stop(): Promise<void>;
}

/** Sweeps from the Sweep view as a user does (range, points per decade, cycles, Start) and waits until the run is done. */
export async function sweepInWindow(page: Page, sweep: { from: string; to: string; pointsPerDecade: number; minCycles: number }): Promise<void> {
  await page.keyboard.press('Alt+3');
  await page.getByTestId('sweep-from').fill(sweep.from);
  await page.getByTestId('sweep-to').fill(sweep.to);
  await page.getByTestId('sweep-ppd').fill(String(sweep.pointsPerDecade));
  await page.getByTestId('sweep-cycles').fill(String(sweep.minCycles));
  await expect.poll(() => page.getByTestId('sweep-estimate').textContent()).toMatch(/points, about/);
  await page.getByTestId('sweep-start').click();
  await expect.poll(() => page.getByTestId('run-status').textContent(), { timeout: 90_000 }).toBe('done');
}

export async function startLowPassBench(buildLabel: string, options: { beforeWindowLoads?: (page: Page) => Promise<unknown> } = {}): Promise<LowPassBench> {
  const serve = await startServe(['--simulated', '--time-scale', '10', '--max-stimulus', '2']);
  const design = await callService<{ id: number }>(serve, 'saveDesign', [{ ...makeDesignFromTemplate('inverting-lowpass', { rn: 1e3, rf: 10e3, cf: 15e-9 }), name: 'Low-pass, corner 1.06 kHz (invented example)' }]);
  const build = await callService<{ id: number }>(serve, 'createBuild', [{ designId: design.id, label: buildLabel, notes: 'invented example', actualValues: {} }]);
  await callService(serve, 'startSimulatedBench', [design.id]);
  const browser = await launchChromium({ width: 1280, height: 800 });
  const page = await browser.context.newPage();
  await options.beforeWindowLoads?.(page);
  await page.goto(serve.url);
  await page.getByTestId('safety-ok').click();
  await page.locator('.nav-button').first().waitFor();
  return {
    serve,
    buildId: build.id,
    browser,
    page,
    async stop() {
      await browser.close();
      await serve.stop();
    },
  };
}
