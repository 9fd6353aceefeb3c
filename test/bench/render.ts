/**
 * Render benchmark, in Debian's Chromium (playwright-core):
 *  1. Compare view: 50 runs × 400 points overlaid (plus the difference plot and
 *     figure table) — time from handing the comparison to the view until both
 *     charts have drawn. Target < 50 ms.
 *  2. Live sweep: time from a point being measured (the service emits its
 *     `point` event right after committing it to the store) to the Sweep
 *     view's gain chart having drawn it, through the real web host, WebSocket
 *     and renderer, with the simulated bench. Target < 100 ms.
 * The Compare data are invented (single-pole responses with noise), not measured.
 *
 * Run: npx tsx test/bench/render.ts
 */
import { build } from 'esbuild';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type Page } from 'playwright-core';
import { bundleRenderer } from '../../app/host/renderer-bundle';
import { startWebHost } from '../../app/host/web-host';
import { openHostedService } from '../../app/host/hosted-service';
import { makeDesignFromTemplate } from '../../app/circuit';
import type { Comparison, RunDetail } from '../../app/contract/contract';
import { CHROMIUM_ARGS, CHROMIUM_PATH } from '../e2e/helpers/chromium';
import { percentile } from '../../app/numeric';

const ROOT = resolve(fileURLToPath(new URL('.', import.meta.url)), '../..');
const RUNS = 50;
const POINTS = 400;
const COMPARE_REPEATS = 15;
const COMPARE_TARGET_MS = 50;
const LIVE_TARGET_MS = 100;

function summary(values: number[]): string {
  return `median ${percentile(values, 50).toFixed(1)} ms, p95 ${percentile(values, 95).toFixed(1)} ms, max ${Math.max(...values).toFixed(1)} ms (n = ${values.length})`;
}

/** Invented runs: a −100 gain stage with a single-pole roll-off near 10 kHz, each run a little different, with noise. */
function inventedComparison(): Comparison {
  let seed = 12345;
  const random = () => ((seed = (seed * 1_103_515_245 + 12_345) % 2 ** 31) / 2 ** 31) - 0.5;
  const frequencyHz = Array.from({ length: POINTS }, (_, i) => 10 * 10 ** ((5 * i) / (POINTS - 1)));
  const gainAt = (f: number, cornerHz: number) => 40 - 10 * Math.log10(1 + (f / cornerHz) ** 2);
  const theory = { frequencyHz, gainDb: frequencyHz.map((f) => gainAt(f, 9_900)), phaseDeg: frequencyHz.map(() => 0), idealGainDb: frequencyHz.map(() => 40), idealPhaseDeg: frequencyHz.map(() => 180) };
  const runs = Array.from({ length: RUNS }, (_, r) => {
    const corner = 9_900 * (1 + 0.004 * (r - RUNS / 2));
    const gainDb = frequencyHz.map((f) => gainAt(f, corner) + 0.01 * random());
    return {
      id: r + 1,
      buildLabel: `board ${r + 1}`,
      theory,
      theoryGainLimitHz: 9_900,
      points: { stimulus: frequencyHz, gainDb },
      figures: { minus3dbHz: [corner], gainLimitHz: corner, passbandGainDb: 40 },
    } as unknown as RunDetail;
  });
  return {
    runs,
    referenceRunId: 'theory',
    differences: runs.map((run) => ({ runId: run.id, stimulus: frequencyHz, deltaDb: run.points.gainDb.map((g, i) => g - theory.gainDb[i]) })),
    figureTable: runs.map((run) => ({ runId: run.id, label: run.buildLabel, figures: run.figures, deltas: { gainLimitHz: (run.figures.gainLimitHz ?? 0) - 9_900 }, verdict: null })),
  };
}

/** A page with only the Compare view, bundled from the real renderer sources. */
async function comparePage(): Promise<string> {
  const result = await build({
    stdin: {
      contents: `
        import 'uplot/dist/uPlot.min.css';
        import './renderer/styles.css';
        import { CompareView } from './renderer/views/compare-view';
        import { AppState } from './renderer/state';
        const view = new CompareView(new Proxy({}, { get() { throw new Error('no service in the render benchmark'); } }), new AppState());
        document.body.appendChild(view.element);
        window.renderComparison = (comparison) => new Promise((resolve) => {
          const charts = view.element.querySelectorAll('.chart');
          let pending = charts.length;
          const start = performance.now();
          const done = () => { if (--pending === 0) resolve(performance.now() - start); };
          for (const chart of charts) chart.addEventListener('rolloff:drawn', done, { once: true });
          view.show(comparison);
        });`,
      resolveDir: ROOT,
      loader: 'ts',
    },
    bundle: true,
    write: false,
    outdir: '/bench-out',
    format: 'esm',
    platform: 'browser',
    minify: true,
    logLevel: 'silent',
  });
  const js = result.outputFiles.find((f) => f.path.endsWith('.js'))!.text;
  const css = result.outputFiles.find((f) => f.path.endsWith('.css'))?.text ?? '';
  return `<!doctype html><html><head><style>${css}</style></head><body class="view-host"><script type="module">${js}</script></body></html>`;
}

/** Times rendering `comparison` COMPARE_REPEATS times after two warm-up renders. */
async function timeRenders(page: Page, makeComparison: (iteration: number) => Comparison): Promise<number[]> {
  const times: number[] = [];
  for (let i = 0; i < COMPARE_REPEATS + 2; i++) {
    const ms = await page.evaluate((c) => (window as unknown as { renderComparison(c: unknown): Promise<number> }).renderComparison(c), makeComparison(i) as unknown);
    if (i >= 2) times.push(ms); // the first two warm up the JIT and fonts
  }
  const shown = await page.evaluate(() => ({ runs: document.querySelector('section')?.dataset.comparedRuns, rows: document.querySelectorAll('[data-testid="compare-table"] tbody tr').length }));
  if (shown.runs !== String(RUNS) || shown.rows !== RUNS) throw new Error(`the view shows ${shown.runs} runs and ${shown.rows} table rows; expected ${RUNS}`);
  return times;
}

async function benchmarkCompare(page: Page): Promise<{ firstRender: number[]; newData: number[] }> {
  await page.setContent(await comparePage());
  await page.waitForFunction(() => 'renderComparison' in window);
  const base = inventedComparison();
  // A different set of runs each time: the charts are rebuilt (what opening Compare costs).
  const firstRender = await timeRenders(page, (i) => ({ ...base, runs: base.runs.map((run) => ({ ...run, buildLabel: `${run.buildLabel} (${i})` })) }));
  // The same runs again (e.g. another reference): the charts are kept, only data change.
  const newData = await timeRenders(page, () => base);
  return { firstRender, newData };
}

async function benchmarkLiveSweep(page: Page): Promise<number[]> {
  const dir = mkdtempSync(join(tmpdir(), 'rolloff-render-bench-'));
  const hosted = await openHostedService(join(dir, 'bench.sqlite'), { maxStimulusVpp: 2, simulatedBench: { timeScale: 2 } });
  const host = await startWebHost({ api: hosted.api, subscribe: hosted.subscribe, files: await bundleRenderer(), host: '127.0.0.1', port: 0 });
  try {
    const design = await hosted.api.saveDesign(makeDesignFromTemplate('inverting-gain', { rf: 100_000 }));
    await hosted.api.createBuild({ designId: design.id, label: 'bench board', notes: 'invented', actualValues: {} });
    await hosted.api.startSimulatedBench(design.id);
    const emittedAt: number[] = [];
    const unsubscribe = hosted.subscribe((event) => {
      if (event === 'point') emittedAt.push(Date.now());
    });
    await page.goto(host.url);
    await page.getByTestId('safety-ok').click();
    await page.keyboard.press('Alt+3');
    await page.evaluate(() => {
      const log: Array<{ at: number; points: number }> = [];
      (window as unknown as { drawLog: typeof log }).drawLog = log;
      document.addEventListener('rolloff:drawn', (event) => {
        const chart = event.target as HTMLElement;
        if (chart.dataset.chart !== 'gain' || !chart.closest('[data-testid="sweep-plot"]')) return;
        log.push({ at: performance.timeOrigin + performance.now(), points: Number(chart.closest<HTMLElement>('.bode')!.dataset.measuredPoints) });
      });
    });
    await page.getByTestId('sweep-from').fill('100');
    await page.getByTestId('sweep-to').fill('1meg');
    await page.getByTestId('sweep-ppd').fill('8');
    await page.getByTestId('sweep-start').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="run-status"]')?.textContent === 'done', undefined, { timeout: 120_000 });
    unsubscribe();
    const log = await page.evaluate(() => (window as unknown as { drawLog: Array<{ at: number; points: number }> }).drawLog);
    const latencies: number[] = [];
    const slowest: Array<[number, number]> = [];
    emittedAt.forEach((at, i) => {
      const drawn = log.find((entry) => entry.points >= i + 1 && entry.at >= at);
      if (drawn) {
        latencies.push(drawn.at - at);
        slowest.push([drawn.at - at, i]);
      }
    });
    slowest.sort((a, b) => b[0] - a[0]);
    process.stdout.write(`  slowest points (ms @ point index): ${slowest.slice(0, 4).map(([ms, i]) => `${ms.toFixed(0)} @ ${i}`).join(', ')}\n`);
    if (latencies.length < emittedAt.length * 0.9) throw new Error(`only ${latencies.length} of ${emittedAt.length} points were seen drawn`);
    return latencies;
  } finally {
    await host.close();
    await hosted.close();
    rmSync(dir, { recursive: true, force: true });
  }
}

const profile = mkdtempSync(join(tmpdir(), 'rolloff-render-chromium-'));
const context = await chromium.launchPersistentContext(profile, { executablePath: CHROMIUM_PATH, headless: true, args: CHROMIUM_ARGS, viewport: { width: 1280, height: 800 } });
try {
  const page = await context.newPage();
  const compare = await benchmarkCompare(page);
  const verdict = (times: number[]) => (percentile(times, 50) < COMPARE_TARGET_MS ? 'met (median)' : 'NOT met (median)');
  process.stdout.write(`Compare view, ${RUNS} runs × ${POINTS} points, charts built: ${summary(compare.firstRender)}; target < ${COMPARE_TARGET_MS} ms → ${verdict(compare.firstRender)}\n`);
  process.stdout.write(`Compare view, ${RUNS} runs × ${POINTS} points, new data:     ${summary(compare.newData)}; target < ${COMPARE_TARGET_MS} ms → ${verdict(compare.newData)}\n`);
  const live = await benchmarkLiveSweep(await context.newPage());
  process.stdout.write(`Live sweep, point measured → drawn: ${summary(live)}; target < ${LIVE_TARGET_MS} ms → ${percentile(live, 95) < LIVE_TARGET_MS ? 'met (p95)' : 'NOT met (p95)'}\n`);
} finally {
  await context.close();
  rmSync(profile, { recursive: true, force: true });
}
