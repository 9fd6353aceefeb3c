/**
 * PDF records open in a real PDF reader (poppler): pdftoppm renders every page,
 * pdftotext finds the build label, each instrument's *IDN? reply, the digest
 * and the verdict. Run data: fixture theory plus seeded noise
 * (test/unit/record/fixtures.ts).
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { requireTool } from '../../helpers/required-tool';
import { buildComparisonRecord, buildNoiseRunRecord, buildRunRecord, renderRecord, type AnyRecord } from '../../../app/record';
import { FIGURE_NAMES } from '../../../app/contract/vocabulary';
import { CURVE_NAMES } from '../../../app/contract/plot-palette';
import { noiseRunFixture } from '../../unit/record/noise-fixtures';
import { idnText } from '../../../app/record/record-formatting';
import { acRunDetail, comparisonFixture, dcRunDetail, fixtureBuild, FIXTURE_DESIGN, LOG_STAGE_DESIGN } from '../../unit/record/fixtures';

const hasPoppler = requireTool('pdftoppm', 'pdftotext');
const dir = mkdtempSync(join(tmpdir(), 'rolloff-record-pdf-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function writePdf(record: AnyRecord, name: string, standardFontsOnly = false): Promise<string> {
  const rendered = await renderRecord(record, 'pdf', { standardFontsOnly });
  expect(rendered.mimeType).toBe('application/pdf');
  const path = join(dir, name);
  writeFileSync(path, rendered.bytes);
  return path;
}

function pageCount(path: string): number {
  const info = execFileSync('pdfinfo', [path], { encoding: 'utf8' });
  return Number(/Pages:\s+(\d+)/.exec(info)?.[1]);
}

/** Renders every page with pdftoppm; returns the PNG files. */
function renderPages(path: string, prefix: string): string[] {
  execFileSync('pdftoppm', ['-r', '40', '-png', path, join(dir, prefix)]);
  return readdirSync(dir).filter((f) => f.startsWith(prefix) && f.endsWith('.png')).map((f) => join(dir, f));
}

/** Text of the PDF with all whitespace removed, so table wrapping does not hide a match. */
function squeezedText(path: string): string {
  return execFileSync('pdftotext', [path, '-'], { encoding: 'utf8' }).replace(/\s+/g, '');
}

const squeeze = (text: string) => text.replace(/\s+/g, '');

function hostileFreeRunRecord() {
  const detail = acRunDetail({ overrangeIndex: 5 });
  return buildRunRecord(detail, { design: FIXTURE_DESIGN, build: fixtureBuild({ label: 'Board A – Ω test µ 25 °C' }), generatedAt: '2026-12-01T12:00:00.000Z' });
}

describe.skipIf(!hasPoppler)('PDF run record', () => {
  it.each([
    ['embedded Unicode font', false],
    ['PDF standard fonts', true],
  ])('opens and carries label, identities, digest and verdict (%s)', async (_name, standardFontsOnly) => {
    const record = hostileFreeRunRecord();
    const path = await writePdf(record, `run-${standardFontsOnly ? 'std' : 'ttf'}.pdf`, standardFontsOnly);
    const pages = pageCount(path);
    expect(pages).toBeGreaterThanOrEqual(2);
    const pngs = renderPages(path, `run-${standardFontsOnly ? 'std' : 'ttf'}-page`);
    expect(pngs).toHaveLength(pages);
    for (const png of pngs) expect(statSync(png).size).toBeGreaterThan(1000);
    const text = squeezedText(path);
    // Standard fonts cannot show Ω; the PDF spells it (the HTML and JSON keep the original).
    expect(text).toContain(squeeze(standardFontsOnly ? 'Board A - ohm test µ 25 °C' : 'Board A – Ω test µ 25 °C'));
    for (const instrument of record.bench) expect(text).toContain(squeeze(idnText(instrument.identity)));
    expect(text).toContain(record.digest.hex);
    expect(text).toContain('Verdict:PASS');
    expect(text).toContain('SIMULATEDBENCH');
    expect(text).toContain(squeeze('Respect the ratings of the instruments'));
  });

  it('a failing run says FAIL with its reasons', async () => {
    const detail = acRunDetail();
    detail.verdict = { pass: false, reasons: ['Pass-band gain 17.2 dB outside [19, 21] dB.'] };
    const path = await writePdf(buildRunRecord(detail, { design: FIXTURE_DESIGN, build: fixtureBuild(), generatedAt: '2026-12-01T12:00:00.000Z' }), 'fail.pdf');
    const text = squeezedText(path);
    expect(text).toContain('Verdict:FAIL');
    expect(text).toContain(squeeze('Pass-band gain 17.2 dB outside [19, 21] dB.'));
  });

  it.each([false, true])('odd text (CJK, emoji, control characters, very long notes) renders without breaking the page (standard fonts: %s)', async (standardFontsOnly) => {
    const detail = acRunDetail();
    detail.request.notes = `${'long note '.repeat(3000)}\u0007end`;
    const record = buildRunRecord(detail, { design: FIXTURE_DESIGN, build: fixtureBuild({ label: 'Board 测试 😀 tab\there\u0001' }), generatedAt: '2026-12-01T12:00:00.000Z' });
    const path = await writePdf(record, `odd-${standardFontsOnly}.pdf`, standardFontsOnly);
    expect(renderPages(path, `odd-${standardFontsOnly}-page`)).toHaveLength(pageCount(path));
    const text = squeezedText(path);
    expect(text).toContain('Board');
    expect(text).toContain('longnoteend');
    expect(text).toContain(record.digest.hex);
  });

  it('the same record gives the same PDF bytes (fixed creation date)', async () => {
    const a = await renderRecord(hostileFreeRunRecord(), 'pdf');
    const b = await renderRecord(hostileFreeRunRecord(), 'pdf');
    expect(Buffer.from(a.bytes).equals(Buffer.from(b.bytes))).toBe(true);
  });
});

describe.skipIf(!hasPoppler)('PDF DC (log stage) record', () => {
  it('opens and shows the transfer plot, the fitted figures and no verdict', async () => {
    const { detail, build, dcFit } = dcRunDetail();
    const record = buildRunRecord(detail, { design: LOG_STAGE_DESIGN, build, dcFit, generatedAt: '2026-12-01T12:00:00.000Z' });
    const path = await writePdf(record, 'dc.pdf');
    expect(renderPages(path, 'dc-page')).toHaveLength(pageCount(path));
    const text = squeezedText(path);
    expect(text).toContain('DCtransfer');
    expect(text).toContain('Diodeidealityfactorn');
    expect(text).toContain('Verdict:NOVERDICT');
    expect(text).toContain('Logstageboard');
    expect(text).toContain(record.digest.hex);
  });
});

describe.skipIf(!hasPoppler)('PDF noise run record', () => {
  it('opens and shows the measured density against the computed one, the figures and the records', async () => {
    const record = buildNoiseRunRecord(noiseRunFixture(), { design: FIXTURE_DESIGN, build: fixtureBuild(), designId: 1, generatedAt: '2026-12-01T12:00:00.000Z' });
    const path = await writePdf(record, 'noise.pdf');
    const pngs = renderPages(path, 'noise-page');
    expect(pngs).toHaveLength(pageCount(path));
    for (const png of pngs) expect(statSync(png).size).toBeGreaterThan(1000);
    const text = squeezedText(path);
    for (const words of ['Output noise density', CURVE_NAMES.measured, `${CURVE_NAMES.theory} (actual circuit)`, CURVE_NAMES.measuredInterval, 'Noise density (V/√Hz)',
      FIGURE_NAMES.noiseMeasuredRmsV, FIGURE_NAMES.noiseShareWithin95, 'held off', 'Records']) expect(text, words).toContain(squeeze(words));
    expect(text).toContain(record.digest.hex);
    expect(text).toContain('SIMULATEDBENCH');
  });
});

describe.skipIf(!hasPoppler)('PDF comparison record', () => {
  it('opens and lists every run, its label and identities, the digests and the verdict', async () => {
    const { comparison, contexts } = comparisonFixture('theory');
    const record = buildComparisonRecord(comparison, { runs: contexts, generatedAt: '2026-12-01T12:00:00.000Z' });
    const path = await writePdf(record, 'comparison.pdf');
    const pages = pageCount(path);
    expect(renderPages(path, 'comparison-page')).toHaveLength(pages);
    const text = squeezedText(path);
    expect(text).toContain(squeeze('Board B (PCB rev 2)'));
    expect(text).toContain(record.digest.hex);
    for (const run of record.runs) {
      expect(text).toContain(run.digest.hex);
      for (const instrument of run.bench) expect(text).toContain(squeeze(idnText(instrument.identity)));
    }
    expect(text).toMatch(/Verdict:(PASS|FAIL)/);
    expect(text).toContain('Differencefromtheory');
  });
});
