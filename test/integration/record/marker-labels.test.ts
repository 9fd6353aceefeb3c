/**
 * Marker labels in a record's plots do not cover each other, read from the
 * files by outside programs: poppler's pdftotext gives every word's box on the
 * PDF page, Chromium lays out the HTML record's SVG and gives each label's box.
 *
 * The stage: an inverting band-pass swept on the simulated bench (TCP, real
 * SQLite file), RN 1 kΩ with CN 1 µF (low corner 1/(2π·RN·CN) ≈ 159 Hz), RF
 * 10 kΩ with CF 2.2 nF (high corner 1/(2π·RF·CF) ≈ 7.2 kHz, handbook
 * single-pole corners), op-amp GBW 1 MHz; the build's CN and CF differ a few
 * per cent, so theory and measurement put their −3 dB markers close together
 * at both corners, and the gain-limit markers of both sit near 1 MHz: six
 * markers in three close pairs on the gain plot, two on the phase plot.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import { openServiceAt } from '../../../app/service/open-service';
import type { ExportedRecord, RunDetail } from '../../../app/contract/contract';
import { requireTool } from '../../helpers/required-tool';
import { boxesOverlap, type Box } from '../../helpers/boxes';
import { launchChromium } from '../../e2e/helpers/chromium';

const hasTools = requireTool('pdftotext', 'chromium');
const folder = mkdtempSync(join(tmpdir(), 'rolloff-marker-labels-'));
afterAll(() => rmSync(folder, { recursive: true, force: true }));

let run: RunDetail;
let pdf: ExportedRecord;
let html: ExportedRecord;

/** Every pair of boxes in one group that share area, named by their labels. */
function overlapsWithin(groups: Map<string, Array<Box & { text: string }>>): string[] {
  const found: string[] = [];
  for (const [group, boxes] of groups) {
    for (let i = 0; i < boxes.length; i++) {
      for (let j = i + 1; j < boxes.length; j++) if (boxesOverlap(boxes[i], boxes[j])) found.push(`${group}: "${boxes[i].text}" and "${boxes[j].text}"`);
    }
  }
  return found;
}

describe.skipIf(!hasTools)('marker labels of a band-pass run record', () => {
  beforeAll(async () => {
    const service = await openServiceAt(join(folder, 'bench.sqlite'), { maxStimulusVpp: 1, simulatedBench: { timeScale: 50, noiseVrms: 1e-4, link: 'tcp' } });
    try {
      const design = await service.saveDesign({ ...makeDesignFromTemplate('inverting-bandpass', { rn: 1e3, cn: 1e-6, rf: 10e3, cf: 2.2e-9, gbw: 1e6 }), name: 'Band-pass 159 Hz – 7.2 kHz (invented example)' });
      const build = await service.createBuild({ designId: design.id, label: 'band-pass board', notes: 'invented example', actualValues: { CN: 0.95e-6, CF: 2.3e-9 } });
      await service.startSimulatedBenchForBuild(build.id);
      const started = await service.startRun({
        buildId: build.id, kind: 'ac', from: 20, to: 2e6, pointsPerDecade: 6, spacing: 'log', amplitude: { mode: 'auto' }, measurement: 'scope',
        minCycles: 3, averages: 1, refine: false, operator: 'integration test', notes: '',
      });
      expect(await service.waitForRun(started.id)).toBe('done');
      run = await service.getRun(started.id);
      pdf = await service.exportRecord([run.id], 'pdf');
      html = await service.exportRecord([run.id], 'html');
    } finally {
      await service.close();
    }
  });

  it('has the many close markers it is about', () => {
    expect(run.theoryMinus3dbHz).toHaveLength(2);
    expect(run.figures.minus3dbHz).toHaveLength(2);
    expect(run.theoryGainLimitHz).toBeGreaterThan(2e5);
    expect(run.figures.gainLimitHz).toBeGreaterThan(2e5);
    // Theory and measurement a few per cent apart at each corner: their labels compete for the same place.
    for (let i = 0; i < 2; i++) expect(Math.abs(Math.log10(run.figures.minus3dbHz[i] / run.theoryMinus3dbHz[i]))).toBeLessThan(0.03);
  });

  it('HTML: in Chromium, no two marker labels of a plot overlap, and each stays inside its plot frame', async () => {
    const browser = await launchChromium();
    try {
      const page = await browser.context.newPage();
      await page.setContent(html.content, { waitUntil: 'load' });
      const plots = await page.evaluate(() =>
        [...document.querySelectorAll('svg.plot')].map((svg) => {
          const frame = [...svg.querySelectorAll('rect')].find((r) => r.getAttribute('fill') === 'none')!.getBoundingClientRect();
          const labels = [...svg.querySelectorAll('text.marker-label')].map((text) => {
            const { x, y, width, height } = text.getBoundingClientRect();
            return { text: text.textContent ?? '', x, y, width, height };
          });
          return { title: svg.getAttribute('aria-label') ?? '', frame: { x: frame.x, y: frame.y, width: frame.width, height: frame.height }, labels };
        }),
      );
      const labelled = plots.filter((p) => p.labels.length > 0);
      expect(labelled.map((p) => p.labels.length)).toEqual([6, 2]);
      expect(overlapsWithin(new Map(labelled.map((p) => [p.title, p.labels])))).toEqual([]);
      for (const plot of labelled) {
        for (const label of plot.labels) {
          expect(label.x, label.text).toBeGreaterThanOrEqual(plot.frame.x);
          expect(label.x + label.width, label.text).toBeLessThanOrEqual(plot.frame.x + plot.frame.width + 0.5);
          expect(label.y, label.text).toBeGreaterThanOrEqual(plot.frame.y);
        }
      }
    } finally {
      await browser.close();
    }
  });

  it('PDF: in the words poppler reads off each page, no two marker labels overlap', () => {
    const path = join(folder, 'record.pdf');
    writeFileSync(path, Buffer.from(pdf.content, 'base64'));
    // -raw keeps the content stream's order, in which each label's words are drawn one after another.
    const xhtml = execFileSync('pdftotext', ['-raw', '-bbox', path, '-'], { encoding: 'utf8' });
    const labelTexts = [...new Set([...html.content.matchAll(/class="marker-label"[^>]*>([^<]+)</g)].map((m) => m[1].replace(/&amp;/g, '&')))];
    expect(labelTexts.length).toBeGreaterThanOrEqual(4);
    const groups = new Map<string, Array<Box & { text: string }>>();
    xhtml.split('<page ').slice(1).forEach((pageText, pageIndex) => {
      const words = [...pageText.matchAll(/<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">([^<]*)<\/word>/g)].map((m) => ({
        xMin: Number(m[1]), yMin: Number(m[2]), xMax: Number(m[3]), yMax: Number(m[4]), text: m[5].replace(/&amp;/g, '&'),
      }));
      const boxes: Array<Box & { text: string }> = [];
      // Longest labels first: "gain limit 997 kHz" is also the tail of "meas. gain limit 997 kHz".
      const taken = new Set<number>();
      for (const label of [...labelTexts].sort((a, b) => b.split(' ').length - a.split(' ').length)) {
        const parts = label.split(' ');
        for (let at = 0; at + parts.length <= words.length; at++) {
          const run = words.slice(at, at + parts.length);
          if (parts.some((_, k) => taken.has(at + k))) continue;
          if (!run.every((word, k) => word.text === parts[k] && Math.abs(word.yMin - run[0].yMin) < 0.5)) continue;
          parts.forEach((_, k) => taken.add(at + k));
          const xMin = Math.min(...run.map((w) => w.xMin));
          const yMin = Math.min(...run.map((w) => w.yMin));
          boxes.push({ text: label, x: xMin, y: yMin, width: Math.max(...run.map((w) => w.xMax)) - xMin, height: Math.max(...run.map((w) => w.yMax)) - yMin });
        }
      }
      if (boxes.length > 0) groups.set(`page ${pageIndex + 1}`, boxes);
    });
    expect([...groups.values()].reduce((n, boxes) => n + boxes.length, 0)).toBe(8);
    expect(overlapsWithin(groups)).toEqual([]);
  });
});
