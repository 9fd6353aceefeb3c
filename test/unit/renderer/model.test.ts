/**
 * The renderer's pure helpers: aligning series for uPlot, the live point
 * buffer, display formatting and view shortcuts. Expected values are worked
 * by hand from the inputs — common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { alignSeries } from '../../../renderer/model/aligned-series';
import { LivePoints, type PointEvent } from '../../../renderer/model/live-points';
import { formatDelta, formatDuration, formatHz } from '../../../renderer/model/format';
import { viewForShortcut } from '../../../renderer/model/views';
import { compareColumns, runColor } from '../../../renderer/model/compare-data';
import type { Comparison, RunDetail } from '../../../app/contract/contract';

function point(index: number, stimulus: number, gainDb = -index): PointEvent {
  return { runId: 5, index, stimulus, gainDb, phaseDeg: 180, outputV: 0, flags: 0, gainUncertaintyDb: 0.01, phaseUncertaintyDeg: 0.1 };
}

describe('alignSeries', () => {
  it('puts series on the sorted union of their x values with nulls for missing points', () => {
    const aligned = alignSeries([
      { xs: [10, 100, 1000], ys: [0, -3, -20] },
      { xs: [100, 50], ys: [-2.9, -1] },
    ]);
    expect(aligned).toEqual([
      [10, 50, 100, 1000],
      [0, null, -3, -20],
      [null, -1, -2.9, null],
    ]);
  });

  it('drops non-finite values instead of drawing them', () => {
    expect(alignSeries([{ xs: [1, 2, Number.NaN], ys: [Number.POSITIVE_INFINITY, 4, 5] }])).toEqual([[1, 2], [null, 4]]);
  });
});

describe('LivePoints', () => {
  it('keeps points sorted by stimulus as refinement points arrive between coarse ones', () => {
    const live = new LivePoints(5);
    live.add(point(0, 10));
    live.add(point(1, 1000));
    live.add(point(2, 100));
    live.add(point(3, 10_000));
    expect(live.stimulus).toEqual([10, 100, 1000, 10_000]);
    expect(live.gainDb).toEqual([-0, -2, -1, -3]);
    expect(live.index).toEqual([0, 2, 1, 3]);
  });

  it('ignores a replayed point and points of other runs', () => {
    const live = new LivePoints(5);
    expect(live.add(point(0, 10))).toBe(true);
    expect(live.add(point(0, 10))).toBe(false);
    expect(live.add({ ...point(1, 20), runId: 6 })).toBe(false);
    expect(live.count).toBe(1);
  });

  it('merges stored points with points that arrived by event, once each', () => {
    const stored = LivePoints.fromColumns(5, { step: [0, 1], stimulus: [10, 100], gainDb: [0, -1], phaseDeg: [0, 0], outputV: [0, 0], flags: [0, 1] });
    const arrived = new LivePoints(5);
    arrived.add(point(1, 100, -1));
    arrived.add(point(2, 1000, -2));
    stored.addAll(arrived);
    expect(stored.stimulus).toEqual([10, 100, 1000]);
    expect(stored.flags).toEqual([0, 1, 0]);
  });
});

describe('formatting', () => {
  it('formats durations at planning resolution', () => {
    expect(formatDuration(44.6)).toBe('45 s');
    expect(formatDuration(185)).toBe('3 min 05 s');
    expect(formatDuration(7_800)).toBe('2 h 10 min');
    expect(formatDuration(Number.NaN)).toBe('—');
  });

  it('formats frequencies with SI prefixes through app/units and signed deltas', () => {
    expect(formatHz(15_915.5)).toBe('15.9 kHz');
    expect(formatHz(undefined)).toBe('—');
    expect(formatDelta(1.2, 'dB')).toBe('+1.20 dB');
    expect(formatDelta(-0.5, 'dB', 1)).toBe('−0.5 dB');
  });
});

describe('view shortcuts', () => {
  it('maps Alt+digit to the views, by physical key when the layout changes the character', () => {
    expect(viewForShortcut({ altKey: true, ctrlKey: false, metaKey: false, key: '3' })).toBe('sweep');
    expect(viewForShortcut({ altKey: true, ctrlKey: false, metaKey: false, key: '¡', code: 'Digit1' })).toBe('bench');
    expect(viewForShortcut({ altKey: true, ctrlKey: false, metaKey: false, key: '0' })).toBe('about');
    expect(viewForShortcut({ altKey: false, ctrlKey: true, metaKey: false, key: '3' })).toBeUndefined();
    expect(viewForShortcut({ altKey: true, ctrlKey: false, metaKey: false, key: '9' })).toBeUndefined();
  });
});

describe('compare columns', () => {
  it('overlays each run on the first run’s theory and aligns the differences', () => {
    const run = (id: number, stimulus: number[], gainDb: number[]) =>
      ({ id, points: { stimulus, gainDb }, theory: { frequencyHz: [10, 100, 1000], gainDb: [20, 20, 17] } }) as unknown as RunDetail;
    const comparison = {
      runs: [run(1, [10, 100], [19.9, 19.8]), run(2, [100, 1000], [20.1, 16.5])],
      referenceRunId: 'theory',
      differences: [
        { runId: 1, stimulus: [10, 100], deltaDb: [-0.1, -0.2] },
        { runId: 2, stimulus: [100, 1000], deltaDb: [0.1, -0.5] },
      ],
      figureTable: [],
    } as Comparison;
    const { overlay, difference } = compareColumns(comparison);
    expect(overlay).toEqual([[10, 100, 1000], [20, 20, 17], [19.9, 19.8, null], [null, 20.1, 16.5]]);
    expect(difference).toEqual([[10, 100, 1000], [-0.1, -0.2, null], [null, 0.1, -0.5]]);
  });

  it('gives 50 runs 50 distinct colours', () => {
    expect(new Set(Array.from({ length: 50 }, (_, i) => runColor(i, 50))).size).toBe(50);
  });
});
