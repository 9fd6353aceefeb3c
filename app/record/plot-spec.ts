/**
 * A record plot as data, and its layout into drawing primitives in a frame
 * (top-left origin, y downward, as both SVG and PDF pages use). The SVG and
 * PDF writers only draw these primitives, so the two formats cannot disagree.
 */
import { axisFraction, type Axis } from './plot-axes';
import type { MaybeNumber } from './model';
import { placeMarkerLabels } from '../plot-layout/marker-label-placement';

export type SeriesStyle = 'line' | 'dashed' | 'points';

export interface PlotSeries {
  name: string;
  color: string;
  style: SeriesStyle;
  xs: MaybeNumber[];
  ys: MaybeNumber[];
  /** Half-width of an error bar per point (same unit as ys), drawn for 'points'. */
  errors?: MaybeNumber[];
}

/** A shaded band between two curves, e.g. the tolerance band of the theory. */
export interface PlotBand {
  name: string;
  color: string;
  xs: MaybeNumber[];
  lows: MaybeNumber[];
  highs: MaybeNumber[];
}

/** A vertical line at x with a short label, e.g. a −3 dB point or the gain-limit point. */
export interface PlotMarker {
  name: string;
  color: string;
  x: number;
  label: string;
}

export interface PlotSpec {
  title: string;
  x: Axis;
  y: Axis;
  bands: PlotBand[];
  series: PlotSeries[];
  markers: PlotMarker[];
}

export interface Frame {
  left: number;
  top: number;
  width: number;
  height: number;
}

export interface XY {
  x: number;
  y: number;
}

/** How a writer sizes marker labels in its own font and unit, so their places hold on its page. */
export interface MarkerLabelMetrics {
  /** Width of a label's text as the writer draws it. */
  widthOf(text: string): number;
  /** Height of the text's line box. */
  lineHeight: number;
}

/** Space between a marker line and its label, between two labels in a row, and between rows (page units). */
const MARKER_LABEL_SPACING = { offset: 2, gap: 3, row: 1 };

export interface PlotLayout {
  frame: Frame;
  grid: Array<{ from: XY; to: XY; major: boolean }>;
  xLabels: Array<{ at: XY; text: string }>;
  yLabels: Array<{ at: XY; text: string }>;
  bands: Array<{ color: string; polygons: XY[][] }>;
  lines: Array<{ color: string; dashed: boolean; paths: XY[][] }>;
  points: Array<{ color: string; dots: XY[]; errorBars: Array<[XY, XY]> }>;
  /** Each label's box: its text starts at the box's left edge, the box's top is the top of its line. */
  markers: Array<{ color: string; from: XY; to: XY; label: string; labelBox: Frame }>;
  legend: Array<{ name: string; color: string; style: SeriesStyle | 'band' | 'marker' }>;
}

export function layoutPlot(spec: PlotSpec, frame: Frame, labelMetrics: MarkerLabelMetrics): PlotLayout {
  const toX = (value: MaybeNumber) => frame.left + axisFraction(spec.x, value) * frame.width;
  const toY = (value: MaybeNumber) => frame.top + (1 - axisFraction(spec.y, value)) * frame.height;
  const clampY = (y: number) => Math.min(frame.top + frame.height, Math.max(frame.top, y));
  const inside = (p: XY) =>
    Number.isFinite(p.x) && Number.isFinite(p.y) && p.x >= frame.left - 0.5 && p.x <= frame.left + frame.width + 0.5 && p.y >= frame.top - 0.5 && p.y <= frame.top + frame.height + 0.5;
  const bottom = frame.top + frame.height;

  const grid: PlotLayout['grid'] = [];
  const xLabels: PlotLayout['xLabels'] = [];
  const yLabels: PlotLayout['yLabels'] = [];
  for (const tick of spec.x.ticks) {
    const x = toX(tick.value);
    if (!Number.isFinite(x)) continue;
    grid.push({ from: { x, y: frame.top }, to: { x, y: bottom }, major: tick.major });
    if (tick.label) xLabels.push({ at: { x, y: bottom }, text: tick.label });
  }
  for (const tick of spec.y.ticks) {
    const y = toY(tick.value);
    if (!Number.isFinite(y)) continue;
    grid.push({ from: { x: frame.left, y }, to: { x: frame.left + frame.width, y }, major: tick.major });
    if (tick.label) yLabels.push({ at: { x: frame.left, y }, text: tick.label });
  }

  const bands = spec.bands.map((band) => {
    // One polygon per unbroken run of valid samples: upper edge forward, lower edge back.
    const polygons: XY[][] = [];
    let upper: XY[] = [];
    let lower: XY[] = [];
    const flush = () => {
      if (upper.length > 1) polygons.push([...upper, ...lower.reverse()]);
      upper = [];
      lower = [];
    };
    band.xs.forEach((xValue, i) => {
      const x = toX(xValue);
      const yHigh = toY(band.highs[i]);
      const yLow = toY(band.lows[i]);
      if (!Number.isFinite(x) || !Number.isFinite(yHigh) || !Number.isFinite(yLow)) return flush();
      upper.push({ x, y: clampY(yHigh) });
      lower.push({ x, y: clampY(yLow) });
    });
    flush();
    return { color: band.color, polygons };
  });

  const lines: PlotLayout['lines'] = [];
  const points: PlotLayout['points'] = [];
  for (const series of spec.series) {
    if (series.style === 'points') {
      const dots: XY[] = [];
      const errorBars: Array<[XY, XY]> = [];
      series.xs.forEach((xValue, i) => {
        const p = { x: toX(xValue), y: toY(series.ys[i]) };
        if (!inside(p)) return;
        dots.push(p);
        const error = series.errors?.[i];
        const yValue = series.ys[i];
        if (error !== undefined && error !== null && error > 0 && yValue !== null) {
          errorBars.push([
            { x: p.x, y: clampY(toY(yValue + error)) },
            { x: p.x, y: clampY(toY(yValue - error)) },
          ]);
        }
      });
      points.push({ color: series.color, dots, errorBars });
    } else {
      const paths: XY[][] = [];
      let current: XY[] = [];
      series.xs.forEach((xValue, i) => {
        const p = { x: toX(xValue), y: toY(series.ys[i]) };
        if (!inside(p)) {
          if (current.length > 1) paths.push(current);
          current = [];
          return;
        }
        current.push(p);
      });
      if (current.length > 1) paths.push(current);
      lines.push({ color: series.color, dashed: series.style === 'dashed', paths });
    }
  }

  const shownMarkers = spec.markers
    .map((marker) => ({ marker, x: toX(marker.x), width: labelMetrics.widthOf(marker.label) }))
    .filter(({ x }) => Number.isFinite(x) && x >= frame.left && x <= frame.left + frame.width);
  // One placement for the window's charts and the records: beside its line, in the first row its box clears.
  const places = placeMarkerLabels(
    shownMarkers.map(({ x, width }) => ({ lineX: x - frame.left, width })),
    { width: frame.width, offset: MARKER_LABEL_SPACING.offset, gap: MARKER_LABEL_SPACING.gap },
  );
  const markers: PlotLayout['markers'] = shownMarkers.map(({ marker, x, width }, i) => ({
    color: marker.color,
    from: { x, y: frame.top },
    to: { x, y: bottom },
    label: marker.label,
    labelBox: {
      left: frame.left + places[i].left,
      top: frame.top + MARKER_LABEL_SPACING.offset + places[i].row * (labelMetrics.lineHeight + MARKER_LABEL_SPACING.row),
      width,
      height: labelMetrics.lineHeight,
    },
  }));

  const legend: PlotLayout['legend'] = [
    ...spec.bands.map((b) => ({ name: b.name, color: b.color, style: 'band' as const })),
    ...spec.series.map((s) => ({ name: s.name, color: s.color, style: s.style })),
  ];
  const markerNames = new Map<string, string>();
  for (const m of spec.markers) if (!markerNames.has(m.name)) markerNames.set(m.name, m.color);
  for (const [name, color] of markerNames) legend.push({ name, color, style: 'marker' });

  return { frame, grid, xLabels, yLabels, bands, lines, points, markers, legend };
}
