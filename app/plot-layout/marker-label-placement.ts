/**
 * Where the labels of vertical marker lines go, so that each one reads: a
 * label sits beside its line (right of it, or left where it would run past
 * the plot's right edge), in the top row where its box clears every label
 * already placed. Labels of markers far apart share the top row; labels of
 * close markers (the −3 dB point of theory and of the measurement, say)
 * stack instead of covering each other. The window's charts and the records'
 * PDF and SVG plots all place their labels here. Pure, and in one unit
 * throughout: CSS pixels in the window, points or SVG units in a record.
 */

export interface LabelToPlace {
  /** x of the marker line from the plot area's left edge. */
  lineX: number;
  /** Width of the label's box. */
  width: number;
}

export interface PlacedLabel {
  /** Left edge of the label's box from the plot area's left edge. */
  left: number;
  /** 0 for the top row, 1 below it, … */
  row: number;
}

export interface LabelArea {
  /** Width of the plot area. */
  width: number;
  /** Space between a line and its label. */
  offset: number;
  /** Least space between two labels in one row. */
  gap: number;
}

export function placeMarkerLabels(labels: LabelToPlace[], area: LabelArea): PlacedLabel[] {
  /** Occupied [from, to] spans per row. */
  const rows: Array<Array<[number, number]>> = [];
  return labels.map(({ lineX, width }) => {
    const rightOfLine = lineX + area.offset;
    const preferred = rightOfLine + width <= area.width ? rightOfLine : lineX - area.offset - width;
    // A label wider than the room beside its line still stays inside the plot.
    const left = Math.max(0, Math.min(preferred, area.width - width));
    const from = left - area.gap;
    const to = left + width + area.gap;
    let row = rows.findIndex((spans) => spans.every(([a, b]) => to <= a || from >= b));
    if (row < 0) row = rows.push([]) - 1;
    rows[row].push([left, left + width]);
    return { left, row };
  });
}
