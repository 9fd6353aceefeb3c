/**
 * The Sweep view's point count, in Debian's Chromium against the real
 * `rolloff serve --simulated`: a sweep with refinement on adds points after
 * the planned grid, and the view says how many of each — "N planned + M
 * refinement", the words the CLI and the records use — both while it follows
 * the run live and when the finished run is opened again from History, never
 * more points "of" the plan than the plan has.
 *
 * The stage: the low-pass of helpers/low-pass-bench.ts (−3 dB at ≈ 1.06 kHz,
 * inside 100 Hz – 20 kHz), so refinement has a −3 dB point to add steps
 * around. Expected counts: the steps the run's request plans to, and the
 * points the store flags as refinement, both read over the API.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { requireTool } from '../helpers/required-tool';
import { callService, type ServeProcess } from './helpers/serve-process';
import { startLowPassBench, sweepInWindow, type LowPassBench } from './helpers/low-pass-bench';
import { PointFlag, type RunDetail, type RunSummary, type SweepPlanSummary, type SweepRequest } from '../../app/contract/contract';

describe.skipIf(!requireTool('chromium'))('the Sweep view counts planned and refinement points, in Chromium against rolloff serve --simulated', () => {
  let bench: LowPassBench;
  let serve: ServeProcess;
  let page: Page;

  beforeAll(async () => {
    bench = await startLowPassBench('count board');
    ({ serve, page } = bench);
  });

  afterAll(async () => {
    await bench?.stop();
  });

  /** "N planned + M refinement" for a stored run: the steps its request plans to, and the points flagged as refinement. */
  async function expectedCount(run: RunDetail): Promise<{ planned: number; refinement: number }> {
    const { maxStimulusVpp: _setByTheService, ...request } = run.request as SweepRequest & { maxStimulusVpp?: number };
    const plan = await callService<SweepPlanSummary>(serve, 'planSweep', [request]);
    const refinement = run.points.flags.filter((flags) => (flags & PointFlag.refinement) !== 0).length;
    return { planned: plan.steps.length, refinement };
  }

  it('says "planned + refinement" when a live sweep ends with refinement points, and again when the run is reopened', async () => {
    await sweepInWindow(page, { from: '100', to: '20k', pointsPerDecade: 5, minCycles: 3 });

    const [summary] = await callService<RunSummary[]>(serve, 'listRuns', []);
    const run = await callService<RunDetail>(serve, 'getRun', [summary.id]);
    const { planned, refinement } = await expectedCount(run);
    expect(planned).toBe(run.plannedCount);
    expect(refinement, 'the case that showed more points "of" the plan than it has').toBeGreaterThan(0);
    expect(run.points.step.length).toBe(planned + refinement);
    const honest = `${planned} planned + ${refinement} refinement`;
    const progress = page.getByTestId('sweep-progress');
    await expect.poll(() => progress.textContent(), { timeout: 10_000 }).toContain(honest);
    expect(await progress.textContent()).toMatch(/\(done\)$/);

    // Opened again from History: the stored run, counted the same way.
    await page.keyboard.press('Alt+4');
    await page.locator(`tr[data-run="${run.id}"]`).getByRole('button', { name: 'Open' }).click();
    await expect.poll(() => page.getByTestId('run-header').textContent(), { timeout: 10_000 }).toMatch(new RegExp(`^Run #${run.id}:`));
    await expect.poll(() => progress.textContent(), { timeout: 10_000 }).toContain(honest);
    const shown = (await progress.textContent())!;
    for (const [, measured, of] of shown.matchAll(/(\d+) of (\d+)/g)) expect(Number(measured), shown).toBeLessThanOrEqual(Number(of));
  });
});
