/**
 * One palette for every plot (app/contract/plot-palette.ts): the window's Bode
 * curves and the records' plots take the same colour and name for the same
 * curve, the tolerance band is one legend entry, the measured gain-limit point
 * and the measured −3 dB frequencies are told apart, and colours that label
 * text meet the WCAG 2.1 contrast minimum for text, 4.5:1 on white
 * (SC 1.4.3; relative luminance and contrast ratio as WCAG 2.1 defines them).
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { CURVE_NAMES, PLOT_PALETTE, RUN_COLOURS, runColour } from '../../../app/contract/plot-palette';
import { buildRunRecord } from '../../../app/record';
import { runPlots } from '../../../app/record/record-plots';
import { AC_GAIN_SERIES, AC_PHASE_SERIES, DC_TRANSFER_SERIES } from '../../../renderer/plot/bode-series';
import { acRunDetail, fixtureBuild, FIXTURE_DESIGN } from '../record/fixtures';

const ROOT = new URL('../../../', import.meta.url).pathname;

function luminance(hex: string): number {
  const [r, g, b] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255).map((c) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4));
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}
const onWhite = (hex: string) => (1 + 0.05) / (luminance(hex) + 0.05);

describe('plot palette', () => {
  it('computes contrast as WCAG does (black on white 21:1)', () => {
    expect(onWhite('#000000')).toBeCloseTo(21, 6);
  });

  it('colours that label text or mark a run read at 4.5:1 on white', () => {
    const labelling = ['theory', 'measured', 'distorted', 'gainLimitTheory', 'gainLimitMeasured', 'minus3dbTheory', 'minus3dbMeasured'] as const;
    for (const key of labelling) expect(onWhite(PLOT_PALETTE[key]), key).toBeGreaterThanOrEqual(4.5);
    for (const colour of RUN_COLOURS) expect(onWhite(colour), colour).toBeGreaterThanOrEqual(4.5);
  });

  it('gives every run of a large comparison its own colour, as hex', () => {
    const colours = Array.from({ length: 50 }, (_, i) => runColour(i, 50));
    expect(new Set(colours).size).toBe(50);
    for (const colour of colours) expect(colour).toMatch(/^#[0-9a-f]{6}$/);
  });

  it('the window and the record draw theory and measurement in the same colours under the same names', () => {
    const record = buildRunRecord(acRunDetail(), { design: FIXTURE_DESIGN, build: fixtureBuild(), designId: 1, generatedAt: '2026-12-01T12:00:00.000Z' });
    const [gain, phase] = runPlots(record);
    const byName = (name: string) => gain.series.find((s) => s.name.startsWith(name));
    expect(byName(CURVE_NAMES.theory)?.color).toBe(PLOT_PALETTE.theory);
    expect(byName(CURVE_NAMES.measured)?.color).toBe(PLOT_PALETTE.measured);
    expect(byName(CURVE_NAMES.ideal)?.color).toBe(PLOT_PALETTE.ideal);
    expect(phase.series.find((s) => s.name.startsWith(CURVE_NAMES.theory))?.color).toBe(PLOT_PALETTE.theory);
    for (const series of [AC_GAIN_SERIES, AC_PHASE_SERIES, DC_TRANSFER_SERIES]) {
      expect(series.find((s) => s.label === CURVE_NAMES.theory)?.color).toBe(PLOT_PALETTE.theory);
      expect(series.find((s) => s.label === CURVE_NAMES.measured)?.color).toBe(PLOT_PALETTE.measured);
    }
    // The band: one entry in each legend.
    expect(gain.bands.map((b) => b.name)).toEqual([CURVE_NAMES.toleranceBand]);
    expect(AC_GAIN_SERIES.filter((s) => s.kind === 'band-edge' && s.inLegend !== false).map((s) => s.label)).toEqual([CURVE_NAMES.toleranceBand]);
  });

  it('the measured gain-limit point and the measured −3 dB frequencies have colours of their own', () => {
    const record = buildRunRecord(acRunDetail(), { design: FIXTURE_DESIGN, build: fixtureBuild(), designId: 1, generatedAt: '2026-12-01T12:00:00.000Z' });
    const markers = runPlots(record)[0].markers;
    const colourOf = (name: RegExp) => new Set(markers.filter((m) => name.test(m.name)).map((m) => m.color));
    expect([...colourOf(/Gain-limit point \(measured\)/)]).toEqual([PLOT_PALETTE.gainLimitMeasured]);
    expect([...colourOf(/−3 dB \(measured\)/)]).toEqual([PLOT_PALETTE.minus3dbMeasured]);
    const four = new Set([PLOT_PALETTE.gainLimitTheory, PLOT_PALETTE.gainLimitMeasured, PLOT_PALETTE.minus3dbTheory, PLOT_PALETTE.minus3dbMeasured, PLOT_PALETTE.measured]);
    expect(four.size).toBe(5);
  });

  it('no plot source picks a colour of its own', () => {
    const files = [...readdirSync(join(ROOT, 'renderer/plot')).map((f) => join(ROOT, 'renderer/plot', f)), join(ROOT, 'app/record/record-plots.ts')];
    const problems = files.flatMap((file) => [...readFileSync(file, 'utf8').matchAll(/#[0-9a-fA-F]{6}\b|rgba?\(|hsl\(/g)].map((m) => `${file.slice(ROOT.length)}: ${m[0]}`));
    expect(problems).toEqual([]);
  });
});
