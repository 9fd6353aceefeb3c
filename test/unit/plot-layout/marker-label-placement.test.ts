/**
 * Placing marker labels so each one reads (app/plot-layout/marker-label-placement.ts).
 * Positions are worked by hand from the rule: right of the line by the offset,
 * left of it where the label would pass the right edge, in the first row it
 * clears by the gap — common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { placeMarkerLabels, type LabelToPlace } from '../../../app/plot-layout/marker-label-placement';
import { boxesOverlap } from '../../helpers/boxes';

const AREA = { width: 800, offset: 4, gap: 6 };
const ROW_PX = 16;
const HEIGHT_PX = 14;

function boxes(labels: LabelToPlace[], area = AREA) {
  return placeMarkerLabels(labels, area).map((p, i) => ({ x: p.left, y: p.row * ROW_PX, width: labels[i].width, height: HEIGHT_PX }));
}

describe('placeMarkerLabels', () => {
  it('puts a label right of its line, in the top row', () => {
    expect(placeMarkerLabels([{ lineX: 100, width: 120 }], AREA)).toEqual([{ left: 104, row: 0 }]);
  });

  it('lets labels of markers far apart share the top row', () => {
    expect(placeMarkerLabels([{ lineX: 100, width: 120 }, { lineX: 400, width: 120 }], AREA)).toEqual([{ left: 104, row: 0 }, { left: 404, row: 0 }]);
  });

  it('stacks the labels of two close markers (−3 dB theory and measured, 2 px apart) so their boxes do not overlap', () => {
    const labels = [{ lineX: 300, width: 150 }, { lineX: 302, width: 160 }];
    expect(placeMarkerLabels(labels, AREA)).toEqual([{ left: 304, row: 0 }, { left: 306, row: 1 }]);
    const [a, b] = boxes(labels);
    expect(boxesOverlap(a, b)).toBe(false);
  });

  it('needs the gap too: labels closer than the gap go to the next row, ones just clear of it stay', () => {
    // First label spans 104…204; a second starting at 208 is 4 px off (< 6 px gap), at 210 exactly the gap.
    expect(placeMarkerLabels([{ lineX: 100, width: 100 }, { lineX: 204, width: 50 }], AREA)[1].row).toBe(1);
    expect(placeMarkerLabels([{ lineX: 100, width: 100 }, { lineX: 206, width: 50 }], AREA)[1].row).toBe(0);
  });

  it('flips a label left of its line near the right edge, and keeps it inside the plot', () => {
    expect(placeMarkerLabels([{ lineX: 750, width: 120 }], AREA)).toEqual([{ left: 750 - 4 - 120, row: 0 }]);
    // Wider than the room on either side: it starts at the left edge.
    expect(placeMarkerLabels([{ lineX: 100, width: 790 }], AREA)).toEqual([{ left: 0, row: 0 }]);
    expect(placeMarkerLabels([{ lineX: 10, width: 900 }], AREA)[0].left).toBe(0);
  });

  it('close markers near the right edge flip and stack, still without overlap', () => {
    const labels = [{ lineX: 780, width: 150 }, { lineX: 783, width: 160 }, { lineX: 790, width: 90 }];
    const placed = boxes(labels);
    for (let i = 0; i < placed.length; i++) {
      expect(placed[i].x + placed[i].width).toBeLessThanOrEqual(AREA.width);
      for (let j = i + 1; j < placed.length; j++) expect(boxesOverlap(placed[i], placed[j]), `${i} and ${j}`).toBe(false);
    }
    expect(new Set(placeMarkerLabels(labels, AREA).map((p) => p.row)).size).toBe(3);
  });

  it('reuses a freed-up upper row for a later label that fits there', () => {
    const placed = placeMarkerLabels([{ lineX: 100, width: 100 }, { lineX: 110, width: 100 }, { lineX: 500, width: 100 }], AREA);
    expect(placed.map((p) => p.row)).toEqual([0, 1, 0]);
  });

  it('places nothing for no markers', () => {
    expect(placeMarkerLabels([], AREA)).toEqual([]);
  });
});
