/**
 * Runs of two benches in one store (one SQLite file swept by two `rolloff
 * sweep` processes named by ROLLOFF_BENCH, as two benches of a lab would), seen
 * in the window of `rolloff serve`: the bench filter of History and of Compare
 * lists only the runs of the bench typed, and each run shows its bench.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { launchChromium } from './helpers/chromium';
import { requireTool } from '../helpers/required-tool';
import { callService, startServe, type ServeProcess } from './helpers/serve-process';
import { sweepAsBench } from './helpers/bench-sweep';
import type { RunSummary } from '../../app/contract/contract';

describe.skipIf(!requireTool('chromium'))('the bench filter of History and Compare', () => {
  const folder = mkdtempSync(join(tmpdir(), 'rolloff-benches-'));
  let serve: ServeProcess | undefined;
  afterAll(async () => {
    await serve?.stop();
    rmSync(folder, { recursive: true, force: true });
  });

  it('shows only the runs of the bench typed, each labelled with its bench', async () => {
    const dbPath = join(folder, 'lab.sqlite');
    for (const bench of ['bench 3', 'bench 3', 'bench 7']) sweepAsBench({ db: dbPath, bench, buildLabel: `board of ${bench}`, folder });
    serve = await startServe([], { dbPath });
    const runs = await callService<RunSummary[]>(serve, 'listRuns', []);
    const idsOf = (bench: string) => runs.filter((run) => run.benchName === bench).map((run) => String(run.id)).sort();
    expect(idsOf('bench 3')).toHaveLength(2);
    expect(idsOf('bench 7')).toHaveLength(1);

    const browser = await launchChromium();
    try {
      const page = await browser.context.newPage();
      await page.goto(serve.url);
      await page.getByTestId('safety-ok').click();

      await page.keyboard.press('Alt+4');
      const historyRows = page.getByTestId('history-runs').locator('tr[data-run]');
      await expect.poll(() => historyRows.count(), { timeout: 10_000 }).toBe(3);
      await page.getByTestId('history-bench').fill('bench 7');
      const shownHistory = () => historyRows.evaluateAll((rows) => rows.map((row) => row.getAttribute('data-run')!).sort());
      await expect.poll(shownHistory, { timeout: 10_000 }).toEqual(idsOf('bench 7'));
      expect(await historyRows.first().locator('td').nth(3).textContent()).toBe('bench 7'); // the Bench column
      // The list offers both benches' names.
      expect(await page.locator('#history-bench-list option').evaluateAll((options) => options.map((o) => (o as HTMLOptionElement).value))).toEqual(['bench 3', 'bench 7']);

      await page.keyboard.press('Alt+5');
      const chips = page.getByTestId('compare-runs').locator('label.run-chip');
      await expect.poll(() => chips.count(), { timeout: 10_000 }).toBe(3);
      await page.getByTestId('compare-bench').fill('bench 3');
      const shownCompare = () => page.getByTestId('compare-runs').locator('[data-compare-run]').evaluateAll((boxes) => boxes.map((box) => box.getAttribute('data-compare-run')!).sort());
      await expect.poll(shownCompare, { timeout: 10_000 }).toEqual(idsOf('bench 3'));
      for (const text of await chips.allTextContents()) expect(text).toMatch(/, bench bench 3$/);
      await page.getByTestId('compare-bench').fill('no such bench');
      await expect.poll(() => page.getByTestId('compare-runs').textContent(), { timeout: 10_000 }).toBe('No runs of this bench.');
    } finally {
      await browser.close();
    }
  });
});
