/**
 * Who drives a run, seen from the window: a `rolloff sweep` process measures
 * while `rolloff serve` runs on the same SQLite file. The History view and the
 * run detail (Sweep view) show the run as running, driven by that process (its
 * pid and host, and the heartbeat's age), and do not offer it for resume; after
 * SIGKILL of the sweep, and once its heartbeat is stale, both show it interrupted.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { hostname, tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { launchChromium } from './helpers/chromium';
import { requireTool } from '../helpers/required-tool';
import { callService, startServe, type ServeProcess } from './helpers/serve-process';
import type { RunSummary } from '../../app/contract/contract';
import { startCliSweep, writeLowpassDesign } from '../integration/sweep/helpers';

const ARTIFACTS = resolve(__dirname, '../artifacts');

describe.skipIf(!requireTool('chromium'))('the driver of a run, in the History view and the run detail', () => {
  const dir = mkdtempSync(join(tmpdir(), 'rolloff-owner-'));
  const dbPath = join(dir, 'bench.sqlite');
  let serve: ServeProcess | undefined;
  afterAll(async () => {
    await serve?.stop();
    rmSync(dir, { recursive: true, force: true });
  });

  it('shows a CLI sweep as running, driven by its process, without a Resume button; after SIGKILL, as interrupted', async () => {
    // Slower than real time (startCliSweep: at least 42 s): the window sees it running.
    const cliSweep = startCliSweep({ dbPath, designPath: writeLowpassDesign(dir), label: 'driven board' });
    const { child: sweep, exited } = cliSweep;
    try {
      await cliSweep.pointsStored();
      serve = await startServe([], { dbPath });
      const [run] = await callService<RunSummary[]>(serve, 'listRuns', []);
      expect(run.owner).toMatchObject({ label: 'rolloff (command line)', pid: sweep.pid, host: hostname(), live: true });

      const browser = await launchChromium();
      try {
        const page = await browser.context.newPage();
        await page.goto(serve.url);
        await page.getByTestId('safety-ok').click();
        await page.keyboard.press('Alt+4');
        const row = page.locator(`[data-run="${run.id}"]`);
        const driven = new RegExp(`^running, driven by rolloff \\(command line\\) pid ${sweep.pid} on ${hostname()}, heartbeat \\d+ s ago$`);
        await expect.poll(() => row.locator('.run-driver').textContent(), { timeout: 10_000 }).toMatch(driven);
        expect(await row.locator('.badge').first().textContent()).toBe('running');
        expect(await row.locator('[data-resume-run]').count()).toBe(0); // only its driver may continue it
        expect(await page.getByTestId('interrupted-runs').textContent()).not.toMatch(new RegExp(`Run #${run.id} `));
        await page.screenshot({ path: join(ARTIFACTS, 'e2e-run-driven-elsewhere.png') });
        // The run detail says the same.
        await row.getByRole('button', { name: 'Open' }).click();
        await expect.poll(() => page.getByTestId('run-driver').textContent(), { timeout: 10_000 }).toMatch(driven);

        sweep.kill('SIGKILL');
        expect(await exited).toBe('SIGKILL');
        // Its heartbeat goes stale (10 s, run-ownership.ts); on this host the process is seen gone at once.
        const interrupted = new RegExp(`^interrupted, last driven by rolloff \\(command line\\) pid ${sweep.pid} on ${hostname()}, heartbeat \\d+ s ago$`);
        await expect.poll(async () => {
          await page.keyboard.press('Alt+4'); // History reads the runs again each time it is opened
          return row.locator('.run-driver').textContent();
        }, { timeout: 15_000 }).toMatch(interrupted);
        expect(await row.locator('.badge').first().textContent()).toBe('interrupted');
        expect(await row.locator(`[data-resume-run="${run.id}"]`).count()).toBe(1);
        await expect.poll(() => page.getByTestId('interrupted-runs').textContent()).toMatch(new RegExp(`Run #${run.id} .*driven board.*\\(interrupted\\)`));
      } finally {
        await browser.close();
      }
    } finally {
      if (sweep.exitCode === null && sweep.signalCode === null) sweep.kill('SIGKILL');
    }
  }, 180_000);
});
