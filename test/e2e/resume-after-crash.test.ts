/**
 * A crash mid-sweep, seen from the window: `rolloff serve` is killed with
 * SIGKILL while a run is measuring, started again on the same database, and
 * the History view offers the unfinished run; resuming it from there finishes
 * it with every planned step measured once (none lost, none repeated).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { launchChromium } from './helpers/chromium';
import { requireTool } from '../helpers/required-tool';
import { callService, startServe, type ServeProcess } from './helpers/serve-process';
import { makeDesignFromTemplate } from '../../app/circuit';
import type { RunDetail, RunSummary } from '../../app/contract/contract';

const ARTIFACTS = resolve(__dirname, '../artifacts');

describe.skipIf(!requireTool('chromium'))('resume after a crash, from the History view', () => {
  const dir = mkdtempSync(join(tmpdir(), 'rolloff-crash-'));
  const dbPath = join(dir, 'bench.sqlite');
  let second: ServeProcess | undefined;
  afterAll(async () => {
    await second?.stop();
    rmSync(dir, { recursive: true, force: true });
  });

  it('offers the killed run for resume and completes it without losing or repeating a step', async () => {
    const first = await startServe(['--simulated', '--time-scale', '1', '--max-stimulus', '2'], { dbPath });
    const design = await callService<{ id: number }>(first, 'saveDesign', [makeDesignFromTemplate('inverting-gain', { rf: 100_000 })]);
    const build = await callService<{ id: number }>(first, 'createBuild', [{ designId: design.id, label: 'crash board', notes: 'invented example', actualValues: {} }]);
    await callService(first, 'startSimulatedBench', [design.id]);
    const request = { buildId: build.id, kind: 'ac', from: 100, to: 200_000, pointsPerDecade: 8, spacing: 'log', amplitude: { mode: 'auto' }, measurement: 'scope', minCycles: 3, averages: 1, refine: false, operator: 'e2e', notes: '' };
    const run = await callService<RunSummary>(first, 'startRun', [request]);
    let before: RunSummary | undefined;
    for (let i = 0; i < 200; i++) {
      before = (await callService<RunSummary[]>(first, 'listRuns', [])).find((r) => r.id === run.id);
      if ((before?.pointCount ?? 0) >= 4) break;
      await new Promise((r) => setTimeout(r, 50));
    }
    await first.kill();
    expect(before!.status).toBe('running');
    expect(before!.pointCount).toBeLessThan(before!.plannedCount);

    second = await startServe(['--simulated', '--time-scale', '4'], { dbPath });
    // No --max-stimulus this time: the simulated bench's saved 2 Vpp is reused, and both the command and the window say so.
    const reused = /[Rr]eusing the limit of 2 Vpp set on \d{4}-\d\d-\d\d \d\d:\d\d:\d\d UTC for the simulated bench of "[^"]+"/;
    expect(second.output()).toMatch(reused);
    const browser = await launchChromium();
    try {
      const page = await browser.context.newPage();
      await page.goto(second.url);
      await page.getByTestId('safety-ok').click();
      await expect.poll(() => page.getByTestId('max-stimulus-source').textContent(), { timeout: 10_000 }).toMatch(reused);
      expect(await page.getByTestId('max-stimulus').inputValue()).toBe('2');
      await page.keyboard.press('Alt+4');
      const offer = page.getByTestId('interrupted-runs');
      await expect.poll(() => offer.textContent(), { timeout: 10_000 }).toMatch(new RegExp(`Run #${run.id} .*crash board`));
      await page.screenshot({ path: join(ARTIFACTS, 'e2e-crash-offer.png') });
      await offer.locator(`[data-resume-run="${run.id}"]`).click();
      await expect.poll(() => page.getByTestId('run-header').textContent(), { timeout: 20_000 }).toMatch(new RegExp(`^Run #${run.id}:`));
      await expect.poll(() => page.getByTestId('run-status').textContent(), { timeout: 60_000 }).toBe('done');
      const detail = await callService<RunDetail>(second, 'getRun', [run.id]);
      const steps = detail.points.step;
      expect(new Set(steps).size).toBe(steps.length);
      expect([...steps].sort((a, b) => a - b)).toEqual(Array.from({ length: detail.plannedCount }, (_, i) => i));
      expect(Number(await page.locator('[data-testid="sweep-plot"] .bode').getAttribute('data-measured-points'))).toBe(detail.plannedCount);
    } finally {
      await browser.close();
    }
  });
});
