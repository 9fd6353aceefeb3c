/**
 * Choosing the store in the window: `rolloff serve` starts on a SQLite file,
 * and on the Bench view's Store panel the user switches to a throw-away
 * PostgreSQL cluster's database (the password in a password file, as a lab
 * would have it) and then sees that store's runs in History. Refused inline,
 * with the store's own words: an address of an unknown scheme (with the forms
 * accepted), an address with a password (never shown back, never printed by
 * the host), a change while a run of this bench is active (naming the run),
 * and a server that cannot be reached. A second window of the same host,
 * open meanwhile, follows the change and says so until dismissed.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { launchChromium } from './helpers/chromium';
import { requireTool } from '../helpers/required-tool';
import { freeLoopbackPort, postgresAvailable, startPostgresCluster, type PostgresCluster } from '../helpers/postgres-cluster';
import { callService, startServe, type ServeProcess } from './helpers/serve-process';
import { sweepAsBench } from './helpers/bench-sweep';
import { makeDesignFromTemplate } from '../../app/circuit';
import type { RunSummary, SweepRequest } from '../../app/contract/contract';

const ARTIFACTS = resolve(__dirname, '../artifacts');

describe.skipIf(!requireTool('chromium') || !postgresAvailable())('choosing the store on the Bench view', () => {
  const dir = mkdtempSync(join(tmpdir(), 'rolloff-store-choice-'));
  let cluster: PostgresCluster | undefined;
  let serve: ServeProcess | undefined;
  afterAll(async () => {
    await serve?.stop();
    cluster?.remove();
    rmSync(dir, { recursive: true, force: true });
  });

  it('switches from a SQLite file to a lab store and shows its runs; refuses bad addresses inline', async () => {
    cluster = await startPostgresCluster();
    const labUrl = cluster.createDatabase('window_choice');
    // Each process finds the password in the cluster's password file; its outbox stays in this test's folder.
    const env = { PGPASSFILE: cluster.passwordFile, ROLLOFF_OUTBOX_DIR: join(dir, 'outbox') };
    sweepAsBench({ db: labUrl, bench: 'lab bench 2', buildLabel: 'board on the lab store', folder: dir, env });

    serve = await startServe(['--simulated', '--time-scale', '0.2', '--max-stimulus', '1'], { env });
    // A slow run on the SQLite file (3 Hz at a time scale of 0.2 takes minutes): this bench is busy.
    const design = await callService<{ id: number }>(serve, 'saveDesign', [{ ...makeDesignFromTemplate('inverting-lowpass', {}), name: 'Low-pass on the file (invented example)' }]);
    const build = await callService<{ id: number }>(serve, 'createBuild', [{ designId: design.id, label: 'board on the file', notes: '', actualValues: {} }]);
    await callService(serve, 'startSimulatedBench', [design.id]);
    const request: SweepRequest = { buildId: build.id, kind: 'ac', from: 3, to: 10_000, pointsPerDecade: 10, spacing: 'log', amplitude: { mode: 'fixed', vpp: 0.5 }, measurement: 'scope', minCycles: 3, averages: 1, refine: false, operator: '', notes: '' };
    const run = await callService<RunSummary>(serve, 'startRun', [request]);

    const browser = await launchChromium();
    try {
      const page = await browser.context.newPage();
      await page.goto(serve.url);
      await page.getByTestId('safety-ok').click();
      const inUse = page.getByTestId('store-location-in-use');
      // A second window of the same host, on the History view (the safety notice already confirmed in this browser).
      const other = await browser.context.newPage();
      await other.goto(serve.url);
      const otherInUse = other.getByTestId('store-location-in-use');
      await expect.poll(() => otherInUse.textContent(), { timeout: 10_000 }).toBe(serve.dbPath);
      await other.keyboard.press('Alt+4');
      await expect.poll(() => inUse.textContent(), { timeout: 10_000 }).toBe(serve.dbPath);
      expect(await page.getByTestId('store-about').textContent()).toMatch(/Named by --db.*applies until this host \(rolloff serve\) stops/);

      const location = page.getByTestId('store-location');
      const result = page.getByTestId('store-result');
      const tryStore = async (address: string) => {
        await location.fill(address);
        await page.getByTestId('store-use').click();
        await expect.poll(() => result.isVisible(), { timeout: 10_000 }).toBe(true);
        return (await result.textContent()) ?? '';
      };

      // An unknown scheme: the store's own refusal, with the forms it accepts.
      expect(await tryStore('ftp://lab/runs')).toMatch(/no store for "ftp" database addresses.*a SQLite file path .* or a PostgreSQL address postgres:\/\/USER@HOST:PORT\/DATABASE/);
      // A password in the address: refused before it leaves the page, pointing to PGPASSWORD or a password file; the field is emptied.
      expect(await tryStore(cluster.urlWithPassword)).toMatch(/has a password in it.*PGPASSWORD.*password file/);
      expect(await location.inputValue()).toBe('');
      expect(await page.content()).not.toContain(cluster.password);
      // A run of this bench is active: refused, naming it.
      expect(await tryStore(labUrl)).toMatch(new RegExp(`Run #${run.id} \\(Low-pass on the file \\(invented example\\) — board on the file\\) is active on this bench.*Pause or stop it`));
      expect(await inUse.textContent()).toBe(serve.dbPath);

      await callService(serve, 'stopRun', [run.id]);
      // A server that cannot be reached (nothing listens on this port): the store's message, inline; the file stays in use.
      const closedPort = await freeLoopbackPort();
      await expect.poll(() => tryStore(`postgres://${cluster!.role}@127.0.0.1:${closedPort}/window_choice`), { timeout: 15_000 }).toMatch(/the PostgreSQL server cannot be reached .*pg_isready/);
      expect(await inUse.textContent()).toBe(serve.dbPath);
      await page.screenshot({ path: join(ARTIFACTS, 'e2e-store-refused.png') });

      // The lab store: in use now, and History lists its run (and not the file's).
      await location.fill(labUrl);
      await page.getByTestId('store-use').click();
      await expect.poll(() => inUse.textContent(), { timeout: 20_000 }).toBe(labUrl);
      expect(await result.isVisible()).toBe(false);
      expect(await page.getByTestId('store-about').textContent()).toMatch(/Chosen in a window of this host/);
      // This window said it once, briefly; it did not also take its own change for another window's.
      expect(await page.locator('.notice-info').allTextContents()).not.toContainEqual(expect.stringMatching(/Another window/));
      await page.keyboard.press('Alt+4');
      const rows = page.getByTestId('history-runs').locator('tr[data-run]');
      await expect.poll(() => rows.count(), { timeout: 10_000 }).toBe(1);
      expect(await rows.first().textContent()).toContain('board on the lab store');
      expect(await rows.first().locator('td').nth(3).textContent()).toBe('lab bench 2');
      await page.screenshot({ path: join(ARTIFACTS, 'e2e-store-lab.png') });

      // The other window: told, until dismissed, and its History lists the lab store's run, not the file's.
      await expect.poll(() => otherInUse.textContent(), { timeout: 10_000 }).toBe(labUrl);
      const told = other.locator('.notice-info', { hasText: 'Another window of this host opened a different store' });
      await expect.poll(() => told.count(), { timeout: 10_000 }).toBe(1);
      expect(await told.textContent()).toContain(labUrl);
      const otherRows = other.getByTestId('history-runs').locator('tr[data-run]');
      await expect.poll(() => otherRows.count(), { timeout: 10_000 }).toBe(1);
      expect(await otherRows.first().textContent()).toContain('board on the lab store');
      await other.waitForTimeout(4_000); // longer than an ordinary notice lasts (3.5 s)
      expect(await told.count()).toBe(1);
      await other.screenshot({ path: join(ARTIFACTS, 'e2e-store-other-window.png') });
    } finally {
      await browser.close();
    }
    expect(serve.output()).not.toContain(cluster.password);
  });
});
