/**
 * Marker labels in a record plot's layout (plot-spec.ts, placed by
 * app/plot-layout/marker-label-placement.ts, as the window's charts are): for a
 * band-pass with many markers — theory and measured −3 dB at both corners, a
 * few per cent apart, and both gain-limit points — no two label boxes overlap,
 * each lies inside the frame and starts or ends beside its own line. The PDF
 * and SVG writers draw the boxes as laid out; test/integration/record/
 * marker-labels.test.ts reads them back from the files. Geometry checks —
 * common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { layoutPlot, type PlotMarker, type PlotSpec } from '../../../app/record/plot-spec';
import { linearAxis, logAxis } from '../../../app/record/plot-axes';
import { boxesOverlap } from '../../helpers/boxes';

const FRAME = { left: 60, top: 20, width: 500, height: 280 };
/** Roughly a 9 px sans-serif: about 5 units a character. */
const METRICS = { widthOf: (text: string) => text.length * 5, lineHeight: 11 };

function bandPassSpec(markers: PlotMarker[]): PlotSpec {
  return {
    title: 'Gain',
    x: logAxis([20, 2e6], 'Frequency (Hz)', 'Hz'),
    y: linearAxis([-40, 20], 'Gain (dB)', 'dB'),
    bands: [],
    series: [],
    markers,
  };
}

const marker = (name: string, x: number, label: string): PlotMarker => ({ name, color: '#000', x, label });

// Corners of an invented band-pass, 159 Hz and 7.2 kHz, measured a few per cent off; gain limit near 1 MHz.
const MANY_MARKERS = [
  marker('Gain-limit point (theory)', 997e3, 'gain limit 997 kHz'),
  marker('Gain-limit point (measured)', 990e3, 'meas. gain limit 990 kHz'),
  marker('−3 dB (theory)', 159, '−3 dB 159 Hz'),
  marker('−3 dB (theory)', 7.23e3, '−3 dB 7.23 kHz'),
  marker('−3 dB (measured)', 162, 'meas. −3 dB 162 Hz'),
  marker('−3 dB (measured)', 6.9e3, 'meas. −3 dB 6.90 kHz'),
  marker('extra', 20e3, 'another marker 20 kHz'),
  marker('extra', 60e3, 'and one more 60 kHz'),
];

describe('marker labels in a record plot', () => {
  const layout = layoutPlot(bandPassSpec(MANY_MARKERS), FRAME, METRICS);
  const boxes = layout.markers.map((m) => ({ x: m.labelBox.left, y: m.labelBox.top, width: m.labelBox.width, height: m.labelBox.height }));

  it('lays out every marker in range, each label as wide as its text measures', () => {
    expect(layout.markers.map((m) => m.label)).toEqual(MANY_MARKERS.map((m) => m.label));
    for (const m of layout.markers) expect(m.labelBox.width).toBe(METRICS.widthOf(m.label));
  });

  it('no two label boxes overlap', () => {
    const overlapping: string[] = [];
    for (let i = 0; i < boxes.length; i++) {
      for (let j = i + 1; j < boxes.length; j++) if (boxesOverlap(boxes[i], boxes[j])) overlapping.push(`${layout.markers[i].label} / ${layout.markers[j].label}`);
    }
    expect(overlapping).toEqual([]);
  });

  it('each label lies inside the frame, beside its own line', () => {
    for (const m of layout.markers) {
      const { left, top, width, height } = m.labelBox;
      expect(left).toBeGreaterThanOrEqual(FRAME.left);
      expect(left + width).toBeLessThanOrEqual(FRAME.left + FRAME.width);
      expect(top).toBeGreaterThanOrEqual(FRAME.top);
      expect(top + height).toBeLessThanOrEqual(FRAME.top + FRAME.height);
      const besideRight = Math.abs(left - m.from.x) <= 2.01;
      const besideLeft = Math.abs(left + width - m.from.x) <= 2.01;
      expect(besideRight || besideLeft, m.label).toBe(true);
    }
  });

  it('labels of markers far apart share the top row; close ones stack', () => {
    const rowOf = (label: string) => layout.markers.find((m) => m.label === label)!.labelBox.top;
    expect(rowOf('−3 dB 159 Hz')).toBe(rowOf('gain limit 997 kHz'));
    expect(rowOf('meas. −3 dB 162 Hz')).toBeGreaterThan(rowOf('−3 dB 159 Hz'));
  });

  it('leaves out a marker outside the axis range, as before', () => {
    expect(layoutPlot(bandPassSpec([marker('far', 1e9, 'off the plot')]), FRAME, METRICS).markers).toEqual([]);
  });
});
