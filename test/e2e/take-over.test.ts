/**
 * Taking over another bench's run from the window: a `rolloff sweep` of bench
 * lab-a is killed; `rolloff serve` of bench lab-b (ROLLOFF_BENCH) offers it for
 * resume, and the History view's Resume asks first, in a dialog naming bench
 * lab-a. Cancel leaves the run as it was; confirming resumes it on lab-b and the
 * run's events record the take-over.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { launchChromium } from './helpers/chromium';
import { requireTool } from '../helpers/required-tool';
import { callService, startServe, type ServeProcess } from './helpers/serve-process';
import type { RunDetail, RunSummary } from '../../app/contract/contract';
import { killed, startCliSweep, writeLowpassDesign } from '../integration/sweep/helpers';

const ARTIFACTS = resolve(__dirname, '../artifacts');

describe.skipIf(!requireTool('chromium'))('taking over another bench\'s run in the window', () => {
  const dir = mkdtempSync(join(tmpdir(), 'rolloff-take-over-'));
  const dbPath = join(dir, 'lab.sqlite');
  let serve: ServeProcess | undefined;
  afterAll(async () => {
    await serve?.stop();
    rmSync(dir, { recursive: true, force: true });
  });

  it('asks in a dialog naming the run\'s bench; cancel changes nothing, confirming resumes it here and records the take-over', async () => {
    const sweep = startCliSweep({ dbPath, designPath: writeLowpassDesign(dir), label: 'bench a board', extra: ['--bench', 'lab-a'] });
    await sweep.pointsStored();
    await killed(sweep.child);

    serve = await startServe(['--simulated', '--time-scale', '50'], { dbPath, env: { ROLLOFF_BENCH: 'lab-b' } });
    const [run] = await callService<RunSummary[]>(serve, 'listRuns', []);
    expect(run).toMatchObject({ benchName: 'lab-a', status: 'running' });
    const browser = await launchChromium();
    try {
      const page = await browser.context.newPage();
      await page.goto(serve.url);
      await page.getByTestId('safety-ok').click();
      await page.keyboard.press('Alt+4');
      const resume = page.locator(`[data-run="${run.id}"] [data-resume-run="${run.id}"]`);
      await resume.click();
      const dialog = page.getByTestId('take-over-dialog');
      await expect.poll(() => dialog.isVisible(), { timeout: 10_000 }).toBe(true);
      expect(await dialog.textContent()).toMatch(new RegExp(`Run #${run.id} belongs to bench “lab-a”`));
      expect(await page.getByTestId('take-over-confirm').textContent()).toBe('Take over from bench “lab-a”');
      await page.screenshot({ path: join(ARTIFACTS, 'e2e-take-over-dialog.png') });

      await page.getByTestId('take-over-cancel').click();
      expect(await dialog.count()).toBe(0);
      const untouched = await callService<RunDetail>(serve, 'getRun', [run.id]);
      expect(untouched).toMatchObject({ status: 'running', pointCount: run.pointCount });
      expect(untouched.events.map((e) => e.message).filter((m) => /taken over|^resumed/.test(m))).toEqual([]);

      await resume.click();
      await page.getByTestId('take-over-confirm').click();
      await expect.poll(async () => (await callService<RunSummary>(serve!, 'getRun', [run.id])).status, { timeout: 60_000 }).toBe('done');
      const finished = await callService<RunDetail>(serve, 'getRun', [run.id]);
      expect(finished.events.map((e) => e.message)).toContain('taken over from bench "lab-a" by bench "lab-b"');
    } finally {
      await browser.close();
    }
  }, 180_000);
});
