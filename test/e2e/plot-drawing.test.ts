/**
 * What the window's plots draw, in Debian's Chromium against the real
 * `rolloff serve --simulated`: a sweep with refinement on, whose refinement
 * points are stored after the planned grid, is drawn left to right in the
 * Compare view (the stroked canvas paths are recorded in the page), and the
 * Bode plot's −3 dB labels of theory and measurement — a few pixels apart —
 * both read, their boxes apart.
 *
 * The stage: the low-pass of helpers/low-pass-bench.ts, −3 dB at ≈ 1.06 kHz.
 */
import { runColour } from '../../app/contract/plot-palette';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { Page } from 'playwright-core';
import { requireTool } from '../helpers/required-tool';
import { callService, type ServeProcess } from './helpers/serve-process';
import { startLowPassBench, type LowPassBench } from './helpers/low-pass-bench';
import { boxesOverlap } from '../helpers/boxes';
import { PointFlag, type Comparison, type RunDetail, type RunSummary } from '../../app/contract/contract';

const ARTIFACTS = resolve(__dirname, '../artifacts');

interface RecordedStroke {
  /** data-testid of the chart's host element. */
  chart: string | null;
  color: string;
  /** x of each moveTo/lineTo of the stroked path, in order (canvas pixels). */
  xs: number[];
}

/**
 * Runs in the page before its scripts: every canvas stroke of a Path2D is
 * recorded with its chart, its colour and the x of each moveTo/lineTo.
 */
function recordCanvasStrokes(): void {
  const xsOf = new WeakMap<Path2D, number[]>();
  const strokes: RecordedStroke[] = [];
  (window as unknown as { __strokes: typeof strokes }).__strokes = strokes;
  for (const name of ['moveTo', 'lineTo'] as const) {
    const original = Path2D.prototype[name];
    Path2D.prototype[name] = function (this: Path2D, x: number, y: number) {
      if (!xsOf.has(this)) xsOf.set(this, []);
      xsOf.get(this)!.push(x);
      return original.call(this, x, y);
    };
  }
  const stroke = CanvasRenderingContext2D.prototype.stroke;
  CanvasRenderingContext2D.prototype.stroke = function (this: CanvasRenderingContext2D, path?: Path2D) {
    if (path instanceof Path2D) {
      strokes.push({ chart: this.canvas.closest('[data-testid]')?.getAttribute('data-testid') ?? null, color: String(this.strokeStyle), xs: [...(xsOf.get(path) ?? [])] });
    }
    return path ? stroke.call(this, path) : (stroke as () => void).call(this);
  } as typeof stroke;
}

describe.skipIf(!requireTool('chromium'))('what the plots draw, in Chromium against rolloff serve --simulated', () => {
  let bench: LowPassBench;
  let serve: ServeProcess;
  let page: Page;
  let run: RunDetail;

  beforeAll(async () => {
    mkdirSync(ARTIFACTS, { recursive: true });
    bench = await startLowPassBench('plot board', { beforeWindowLoads: (newPage) => newPage.addInitScript(recordCanvasStrokes) });
    ({ serve, page } = bench);
    const request = { buildId: bench.buildId, kind: 'ac', from: 100, to: 20_000, pointsPerDecade: 5, spacing: 'log', amplitude: { mode: 'auto' }, measurement: 'scope', minCycles: 3, averages: 1, refine: true, operator: 'e2e', notes: '' };
    const started = await callService<RunSummary>(serve, 'startRun', [request]);
    for (let i = 0; i < 1200; i++) {
      const summary = (await callService<RunSummary[]>(serve, 'listRuns', [])).find((r) => r.id === started.id);
      if (summary && summary.status !== 'running' && summary.status !== 'planned') break;
      await new Promise((r) => setTimeout(r, 100));
    }
    run = await callService<RunDetail>(serve, 'getRun', [started.id]);
  });

  afterAll(async () => {
    await bench?.stop();
  });

  it('the run has refinement points stored after the grid (the case that drew lines backwards)', () => {
    expect(run.status).toBe('done');
    const refined = run.points.flags.map((f, i) => ((f & PointFlag.refinement) !== 0 ? i : -1)).filter((i) => i >= 0);
    expect(refined.length).toBeGreaterThan(0);
    const stimulus = run.points.stimulus;
    expect(stimulus.some((f, i) => i > 0 && f < stimulus[i - 1])).toBe(true);
  });

  it('the Compare view draws every measured point, its strokes left to right', async () => {
    await page.keyboard.press('Alt+4');
    await page.locator(`[data-pick-run="${run.id}"]`).check();
    await page.evaluate(() => ((window as unknown as { __strokes: unknown[] }).__strokes.length = 0));
    await page.getByTestId('compare-picked').click();
    await expect.poll(() => page.locator('section[data-view="compare"]').getAttribute('data-compared-runs'), { timeout: 20_000 }).toBe('1');
    await page.evaluate(() => new Promise((r) => requestAnimationFrame(() => r(null))));
    const strokes = await page.evaluate((runColourText) => {
      // The one run's colour (app/contract/plot-palette.ts runColour(0, 1)), as the canvas spells it.
      const probe = document.createElement('canvas').getContext('2d')!;
      probe.strokeStyle = runColourText;
      const color = String(probe.strokeStyle);
      return (window as unknown as { __strokes: RecordedStroke[] }).__strokes.filter((s) => s.color === color);
    }, runColour(0, 1));
    // What each plot has to draw: every finite gain, and every finite difference from theory.
    const comparison = await callService<Comparison>(serve, 'compareRuns', [[run.id], 'theory']);
    const expected = {
      'compare-overlay': run.points.gainDb.filter(Number.isFinite).length,
      'compare-difference': comparison.differences[0].deltaDb.filter(Number.isFinite).length,
    };
    for (const [chart, count] of Object.entries(expected)) {
      const drawn = strokes.filter((s) => s.chart === chart);
      // The run's line and its point marks; the marks are one moveTo each, so every point is drawn…
      expect(drawn.length, chart).toBeGreaterThanOrEqual(2);
      expect(Math.max(...drawn.map((s) => s.xs.length)), chart).toBe(count);
      // …and each stroke runs left to right.
      for (const stroke of drawn) {
        const backwards = stroke.xs.findIndex((x, i) => i > 0 && x < stroke.xs[i - 1] - 0.5);
        expect(backwards, `${chart} goes back at move ${backwards}: ${stroke.xs.slice(Math.max(0, backwards - 2), backwards + 2).join(', ')}`).toBe(-1);
      }
    }
    await page.screenshot({ path: join(ARTIFACTS, 'e2e-compare-refined.png') });
  });

  it('the Bode plot shows both −3 dB labels, apart, when theory and measurement are close', async () => {
    const theoryHz = run.theoryMinus3dbHz[0];
    const measuredHz = run.figures.minus3dbHz[0];
    // Handbook corner 1/(2π·10 kΩ·15 nF) = 1061 Hz; the simulated stage measures within a few per cent of it.
    expect(theoryHz).toBeGreaterThan(1000);
    expect(theoryHz).toBeLessThan(1120);
    expect(Math.abs(Math.log10(measuredHz / theoryHz))).toBeLessThan(0.02);
    await page.keyboard.press('Alt+4');
    await page.locator(`tr[data-run="${run.id}"]`).getByRole('button', { name: 'Open' }).click();
    const gainChart = page.locator('[data-testid="sweep-plot"] [data-chart="gain"]');
    const theoryLabel = gainChart.locator('.marker-label', { hasText: '−3 dB (theory)' });
    const measuredLabel = gainChart.locator('.marker-label', { hasText: '−3 dB (measured)' });
    await expect.poll(() => measuredLabel.count(), { timeout: 20_000 }).toBe(1);
    expect(await theoryLabel.count()).toBe(1);
    const theoryBox = (await theoryLabel.boundingBox())!;
    const measuredBox = (await measuredLabel.boundingBox())!;
    expect(boxesOverlap(theoryBox, measuredBox), JSON.stringify({ theoryBox, measuredBox })).toBe(false);
    // Both lie inside the plot area, and every label on the plot is clear of every other.
    const area = (await gainChart.locator('.u-over').boundingBox())!;
    const all = await gainChart.locator('.marker-label').all();
    const boxes = await Promise.all(all.map(async (label) => (await label.boundingBox())!));
    for (const box of boxes) {
      expect(box.x).toBeGreaterThanOrEqual(area.x - 0.5);
      expect(box.x + box.width).toBeLessThanOrEqual(area.x + area.width + 0.5);
      expect(box.height).toBeGreaterThan(8);
    }
    for (let i = 0; i < boxes.length; i++) for (let j = i + 1; j < boxes.length; j++) expect(boxesOverlap(boxes[i], boxes[j]), `labels ${i} and ${j}`).toBe(false);
    await page.screenshot({ path: join(ARTIFACTS, 'e2e-bode-labels.png') });
  });
});
