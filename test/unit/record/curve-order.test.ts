/**
 * Measured curves are drawn in frequency order in comparison records
 * (app/record/record-plots.ts) and in the window's Compare plots
 * (renderer/model/compare-data.ts), both through app/numeric's one ordering.
 * The runs carry refinement points stored after the planned grid, as a sweep
 * with refinement stores them. Expected orders are worked by hand — common
 * practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { buildComparisonRecord, buildRunRecord } from '../../../app/record';
import { comparisonPlots, runPlots } from '../../../app/record/record-plots';
import { layoutPlot } from '../../../app/record/plot-spec';
import { compareDetails } from '../../../app/read-model/compare';
import { compareColumns } from '../../../renderer/model/compare-data';
import { PointFlag } from '../../../app/contract/contract';
import { acRunDetail, comparisonFixture, fixtureBuild, FIXTURE_DESIGN } from './fixtures';

/** Near the fixture stage's corner, 1/(2π·100.4 kΩ·1.52 nF) ≈ 1.04 kHz, where a sweep refines. */
const REFINEMENT_HZ = [1200, 950, 1050, 1100];

const nonDecreasing = (values: ArrayLike<number | null>) => Array.from(values).every((v, i, all) => i === 0 || (v as number) >= (all[i - 1] as number));

describe('measured curves with refinement points stored last', () => {
  const { comparison, contexts } = comparisonFixture(12, { refinementHz: REFINEMENT_HZ });

  it('the fixture stores them last, so stored order runs back across the plot', () => {
    const stimulus = comparison.runs[0].points.stimulus;
    expect(stimulus.slice(-4)).toEqual(REFINEMENT_HZ);
    expect(comparison.runs[0].points.flags.slice(-4).every((f) => (f & PointFlag.refinement) !== 0)).toBe(true);
    expect(nonDecreasing(stimulus)).toBe(false);
  });

  for (const reference of [12, 'theory'] as const) {
    it(`comparison record plots draw each run in frequency order (reference ${reference})`, () => {
      const record = buildComparisonRecord(comparison, { runs: contexts, generatedAt: '2026-12-01T12:00:00.000Z' });
      const recordWithService = buildComparisonRecord(compareDetails(comparison.runs, reference), { runs: contexts, generatedAt: '2026-12-01T12:00:00.000Z' });
      for (const r of [record, recordWithService]) {
        const [overlay, difference] = comparisonPlots(r);
        const runSeries = overlay.series.filter((s) => s.name.startsWith('Run '));
        expect(runSeries).toHaveLength(2);
        for (const series of [...runSeries, ...difference.series]) {
          expect(nonDecreasing(series.xs), series.name).toBe(true);
          expect(series.xs).toHaveLength(comparison.runs[0].points.stimulus.length);
        }
        // Each gain stays with its own frequency: the 950 Hz refinement point keeps its stored reading.
        const runA = r.runs[0];
        const stored = runA.points.gainDb[runA.points.stimulus.indexOf(950)];
        expect(runSeries[0].ys[runSeries[0].xs.indexOf(950)]).toBe(stored);
        // The drawn path (what the SVG and PDF writers stroke) runs left to right.
        const layout = layoutPlot(overlay, { left: 0, top: 0, width: 600, height: 300 }, { widthOf: (text) => text.length * 5, lineHeight: 10 });
        for (const line of layout.lines) for (const path of line.paths) expect(nonDecreasing(path.map((p) => p.x))).toBe(true);
      }
    });
  }

  it('the record keeps the points themselves in stored order (their digest covers that order)', () => {
    const record = buildComparisonRecord(comparison, { runs: contexts, generatedAt: '2026-12-01T12:00:00.000Z' });
    expect(record.runs[0].points.stimulus.slice(-4)).toEqual(REFINEMENT_HZ);
  });

  it('the Compare view columns are in frequency order, each gain at its own frequency', () => {
    const { overlay, difference } = compareColumns(compareDetails(comparison.runs, 'theory'));
    for (const columns of [overlay, difference]) expect(nonDecreasing(columns[0])).toBe(true);
    const run = comparison.runs[1];
    const at = overlay[0].indexOf(1050);
    expect(overlay[2 + 1][at]).toBe(run.points.gainDb[run.points.stimulus.indexOf(1050)]);
  });
});

describe('the run record phase plot', () => {
  it('unwraps the measured phase along frequency, not in stored order', () => {
    // Grid 10 Hz … 1 MHz, one point a decade, then a refinement point at 300 Hz stored last.
    const detail = acRunDetail({ pointsPerDecade: 1, refinementHz: [300] });
    expect(detail.points.stimulus).toEqual([10, 100, 1000, 10_000, 100_000, 1_000_000, 300]);
    // A phase falling through 360° in the band, wrapped to (−180°, 180°] as an instrument reads it:
    // unwrapped −10, −60, −200, −340, −350, −355 and −120 at 300 Hz (worked by hand).
    detail.points.phaseDeg = [-10, -60, 160, 20, 10, 5, -120];
    const record = buildRunRecord(detail, { design: FIXTURE_DESIGN, build: fixtureBuild(), designId: 1, generatedAt: '2026-12-01T12:00:00.000Z' });
    const measured = runPlots(record)[1].series.find((s) => s.name.startsWith('Measured'))!;
    const relative = measured.ys.map((y) => (y as number) - (measured.ys[0] as number));
    // In stored order the 300 Hz point would follow 1 MHz (−355°) and land a turn too low, at −470°.
    expect(relative).toEqual([0, -50, -190, -330, -340, -345, -110]);
  });
});
