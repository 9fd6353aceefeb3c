/**
 * The window checks what the host sends back (app/contract/check-reply.ts,
 * renderer/client/contract-proxy.ts), in Debian's Chromium against the real
 * `rolloff serve --simulated`: a real sweep passes every check (no notice, no
 * console error), a planted reply that does not fit (a run whose status is
 * "exploded", put in place of the host's by Playwright's request routing) is
 * said beside the part of the view it was for while the rest still loads, and
 * a planted event without its run id (added to the host's event socket by
 * Playwright's WebSocket routing) is shown once as a notice and reaches no
 * view. Expected wording: the contract's (check-reply.ts) — common practice, no source.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page, WebSocketRoute } from 'playwright-core';
import { requireTool } from '../helpers/required-tool';
import { callService, type ServeProcess } from './helpers/serve-process';
import { startLowPassBench, sweepInWindow, type LowPassBench } from './helpers/low-pass-bench';
import type { RunSummary } from '../../app/contract/contract';

const IGNORED_UPDATE = 'An update from the Rolloff host was ignored';

describe.skipIf(!requireTool('chromium'))('the window checks the host\'s replies and events, in Chromium against rolloff serve --simulated', () => {
  let bench: LowPassBench;
  let serve: ServeProcess;
  let page: Page;
  let events: WebSocketRoute | undefined;
  const consoleErrors: string[] = [];

  beforeAll(async () => {
    bench = await startLowPassBench('reply board', {
      beforeWindowLoads: async (page) => {
        page.on('console', (message) => message.type() === 'error' && consoleErrors.push(message.text()));
        // The host's own event socket, passed through both ways; the test may add a message of its own.
        await page.routeWebSocket(/\/events$/, (route) => {
          const host = route.connectToServer();
          route.onMessage((message) => host.send(message));
          host.onMessage((message) => route.send(message));
          events = route;
        });
      },
    });
    ({ serve, page } = bench);
  });

  afterAll(async () => {
    await bench?.stop();
  });

  it('a real sweep passes every check: it ends with no notice of an error and nothing in the console', async () => {
    await sweepInWindow(page, { from: '300', to: '3k', pointsPerDecade: 3, minCycles: 3 });
    const [run] = await callService<RunSummary[]>(serve, 'listRuns', []);
    expect(run.pointCount).toBeGreaterThan(0);
    await expect.poll(() => page.getByTestId('sweep-progress').textContent(), { timeout: 10_000 }).toMatch(/\(done\)$/);
    expect(await page.locator('.notice-error').count()).toBe(0);
    expect(consoleErrors).toEqual([]);
  });

  it('a run whose status is "exploded" is said beside the runs, with the field and the hint, and the rest of History still loads', async () => {
    const [real] = await callService<RunSummary[]>(serve, 'listRuns', []);
    await page.route(/\/api\/listRuns$/, (route) => route.fulfill({ status: 200, contentType: 'application/json', body: JSON.stringify({ result: [{ ...real, status: 'exploded' }] }) }));
    try {
      await page.keyboard.press('Alt+4');
      const failure = page.getByTestId('runs-failure');
      await expect.poll(() => failure.textContent(), { timeout: 10_000 }).toMatch(
        /^The runs could not be loaded: listRuns\(\) result\[0\]\.status: must be one of planned, running, paused, done, stopped, failed, got "exploded"/,
      );
      expect(await failure.locator('.hint').textContent()).toMatch(/different versions/);
      // The designs and builds come from other calls, which fit: they are listed.
      await expect.poll(() => page.getByTestId('history-designs-failure').isVisible()).toBe(false);
      expect(await page.locator('section[aria-labelledby="history-title"]').textContent()).toMatch(/Low-pass, corner 1\.06 kHz/);
    } finally {
      await page.unroute(/\/api\/listRuns$/);
    }
  });

  it('an event without its run id reaches no view and is shown once as a notice', async () => {
    expect(events, 'the window opened no event socket').toBeDefined();
    const before = await page.locator('.notice-error').count();
    const badPoint = JSON.stringify({ event: 'point', payload: { index: 1, stimulus: 1e3, gainDb: -3, phaseDeg: -45, outputV: null, flags: 0, gainUncertaintyDb: 0.01, phaseUncertaintyDeg: 0.1 } });
    events!.send(badPoint);
    events!.send(badPoint);
    // allTextContents does not wait for a notice to appear, so a missing one fails within the poll's time.
    await expect.poll(async () => (await page.locator('.notice-error').allTextContents()).at(-1), { timeout: 10_000 }).toMatch(
      new RegExp(`^${IGNORED_UPDATE}: point event\\.runId: must be a finite number, got undefined`),
    );
    expect(await page.locator('.notice-error').last().locator('.hint').textContent()).toMatch(/different versions/);
    // Shown once, though sent twice; the view lives on.
    await new Promise((resolve) => setTimeout(resolve, 500));
    expect(await page.locator('.notice-error').count()).toBe(before + 1);
    await page.keyboard.press('Alt+3');
    expect(await page.getByTestId('run-status').textContent()).toBe('done');
  });
});
