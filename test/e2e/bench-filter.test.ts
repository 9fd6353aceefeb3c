/**
 * Runs of two benches in one store (one SQLite file swept by two `rolloff
 * sweep` processes named by ROLLOFF_BENCH, as two benches of a lab would), seen
 * in the window of `rolloff serve`: the bench filter of History and of Compare
 * lists only the runs of the bench typed, and each run shows its bench.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { launchChromium } from './helpers/chromium';
import { requireTool } from '../helpers/required-tool';
import { callService, startServe, type ServeProcess } from './helpers/serve-process';
import { makeDesignFromTemplate } from '../../app/circuit';
import type { RunSummary } from '../../app/contract/contract';

const ROOT = resolve(__dirname, '../..');

/** One short simulated sweep by the bench named `bench`. */
function sweepAs(bench: string, designPath: string, dbPath: string): void {
  const result = spawnSync(process.execPath, ['app/cli/bin.mjs', 'sweep', '--design', designPath, '--label', `board of ${bench}`, '--simulated', '--time-scale', '20',
    '--max-amplitude', '1', '--db', dbPath, '--from', '100', '--to', '1k', '--per-decade', '2'], { cwd: ROOT, encoding: 'utf8', env: { ...process.env, ROLLOFF_BENCH: bench } });
  if (result.status !== 0) throw new Error(`rolloff sweep as ${bench} exited ${result.status}: ${result.stderr}`);
}

describe.skipIf(!requireTool('chromium'))('the bench filter of History and Compare', () => {
  const dir = mkdtempSync(join(tmpdir(), 'rolloff-benches-'));
  const dbPath = join(dir, 'lab.sqlite');
  let serve: ServeProcess | undefined;
  afterAll(async () => {
    await serve?.stop();
    rmSync(dir, { recursive: true, force: true });
  });

  it('shows only the runs of the bench typed, each labelled with its bench', async () => {
    const designPath = join(dir, 'lowpass.json');
    writeFileSync(designPath, JSON.stringify(makeDesignFromTemplate('inverting-lowpass', {})));
    sweepAs('bench 3', designPath, dbPath);
    sweepAs('bench 3', designPath, dbPath);
    sweepAs('bench 7', designPath, dbPath);
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
