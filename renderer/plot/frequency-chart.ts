/**
 * One chart with a logarithmic frequency axis (uPlot): theory lines, the
 * tolerance band, measured points, distorted points and vertical markers for
 * the gain-limit and −3 dB frequencies. Bode, Compare and difference plots are all
 * built from this.
 */
import uPlot from 'uplot';
import type { AlignedColumns } from '../model/aligned-series';
import { formatEngineering, formatFixed, withTrueMinus } from '../../app/units';
import { PLOT_PALETTE } from '../../app/contract/plot-palette';
import { placeMarkerLabels } from '../../app/plot-layout/marker-label-placement';

/** The marker labels' font, as styles.css sets it on .marker-label (measured on the canvas to place them). */
const MARKER_LABEL_FONT = '11px system-ui, sans-serif';
/** .marker-label's left border and padding plus right padding, the space between rows, between a line and its label, between labels (CSS px). */
const MARKER_LABEL_PADDING_PX = 10;
const MARKER_LABEL_ROW_PX = 16;
const MARKER_LABEL_OFFSET_PX = 4;
const MARKER_LABEL_GAP_PX = 6;

export interface SeriesStyle {
  label: string;
  color: string;
  /** 'line': theory; 'points': measured; 'band-edge': invisible edge of a filled band. */
  kind: 'line' | 'points' | 'points-line' | 'band-edge' | 'dashed';
  width?: number;
  pointSize?: number;
  /** false: drawn, but no legend entry (the lower edge of a band the upper edge names). */
  inLegend?: boolean;
}

export interface Marker {
  xHz: number;
  label: string;
  color: string;
}

export interface FrequencyChartOptions {
  yLabel: string;
  yUnit: string;
  series: SeriesStyle[];
  /** Pairs of series indexes (1-based as in uPlot: high, low) filled as a band. */
  bands?: Array<{ high: number; low: number; fill: string }>;
  height: number;
  /** Linear x for DC transfer plots (volts). */
  xLinear?: boolean;
  xLabel?: string;
  /** Unit of the x values for tick labels; hertz unless said otherwise (DC transfer plots use volts). */
  xUnit?: string;
  /** uPlot's legend under the plot; off when many series make it a wall of names (a table names them instead). */
  legend?: boolean;
  /** Write marker labels on the plot (the upper plot of a pair; the lower one shows the lines only). */
  markerLabels?: boolean;
  /** Logarithmic y axis, values and ticks in engineering notation of yUnit (noise densities). */
  yLog?: boolean;
}

export class FrequencyChart {
  readonly plot: uPlot;
  private markers: Marker[] = [];
  private resizeObserver: ResizeObserver | undefined;
  private readonly markerLabels: boolean;
  /** Text labels over the plot area, one per marker on screen; DOM, so they read as text and stay crisp. */
  private readonly labelElements: HTMLSpanElement[] = [];

  constructor(
    readonly container: HTMLElement,
    options: FrequencyChartOptions,
    /** Data and markers to draw at once; saves a second draw when the data are already known. */
    initial?: { columns: AlignedColumns; markers: Marker[] },
  ) {
    this.markers = initial?.markers ?? [];
    this.markerLabels = options.markerLabels ?? true;
    const xUnit = options.xUnit ?? (options.xLinear ? 'V' : 'Hz');
    const uplotOptions: uPlot.Options = {
      width: Math.max(320, container.clientWidth || 800),
      height: options.height,
      legend: { show: options.legend ?? true, live: false },
      cursor: { drag: { x: true, y: false, setScale: true } },
      scales: { x: { time: false, distr: options.xLinear ? 1 : 3 }, y: options.yLog ? { auto: true, distr: 3 } : { auto: true } },
      axes: [
        {
          label: options.xLabel ?? 'Frequency',
          stroke: PLOT_PALETTE.axis,
          grid: { stroke: PLOT_PALETTE.grid, width: 1 },
          ticks: { stroke: PLOT_PALETTE.tick, width: 1 },
          values: (_u, splits) => splits.map((v) => (v == null ? '' : formatEngineering(v, xUnit, 3))),
        },
        {
          label: options.yLabel,
          stroke: PLOT_PALETTE.axis,
          grid: { stroke: PLOT_PALETTE.grid, width: 1 },
          ticks: { stroke: PLOT_PALETTE.tick, width: 1 },
          values: (_u, splits) => splits.map((v) => (v == null ? '' : options.yLog ? formatEngineering(v, options.yUnit, 3) : withTrueMinus(`${Number(v.toPrecision(4))}`))),
          size: options.yLog ? 76 : 56,
        },
      ],
      series: [
        { label: options.xLinear ? 'Input' : 'Frequency', value: (_u, v) => (v == null ? '—' : formatEngineering(v, xUnit, 4)) },
        ...options.series.map((style) => ({ ...seriesOptions(style, options.yUnit, options.yLog === true), ...(style.inLegend === false ? { class: 'not-in-legend' } : {}) })),
      ],
      bands: (options.bands ?? []).map((band) => ({ series: [band.high, band.low] as [number, number], fill: band.fill })),
      hooks: {
        draw: [(u) => this.drawMarkers(u)],
      },
    };
    const data = (initial?.columns ?? [[], ...options.series.map(() => [])]) as unknown as uPlot.AlignedData;
    this.plot = new uPlot(uplotOptions, data, container);
    if (typeof ResizeObserver !== 'undefined') {
      this.resizeObserver = new ResizeObserver(() => {
        const width = container.clientWidth;
        if (width > 0 && Math.abs(width - this.plot.width) > 2) this.plot.setSize({ width, height: options.height });
      });
      this.resizeObserver.observe(container);
    }
  }

  setData(columns: AlignedColumns, markers: Marker[] = this.markers): void {
    this.markers = markers;
    this.plot.setData(columns as unknown as uPlot.AlignedData, true);
  }

  setMarkers(markers: Marker[]): void {
    this.markers = markers;
    this.plot.redraw(false, false);
  }

  destroy(): void {
    this.resizeObserver?.disconnect();
    this.plot.destroy();
  }

  /** One label element per shown marker, over the plot area (uPlot's over layer), where placeMarkerLabels put it. */
  private placeLabels(u: uPlot, markers: Marker[], places: Array<{ left: number; row: number }>): void {
    while (this.labelElements.length > markers.length) this.labelElements.pop()!.remove();
    markers.forEach((marker, i) => {
      let element = this.labelElements[i];
      if (!element) {
        element = document.createElement('span');
        element.className = 'marker-label';
        this.labelElements.push(element);
      }
      if (element.parentElement !== u.over) u.over.appendChild(element);
      element.textContent = marker.label;
      // Set through the style object (CSSOM), which the page's CSP allows.
      element.style.borderLeftColor = marker.color;
      element.style.left = `${places[i].left}px`;
      element.style.top = `${2 + places[i].row * MARKER_LABEL_ROW_PX}px`;
    });
  }

  private drawMarkers(u: uPlot): void {
    const context = u.ctx;
    const { left, top, width, height } = u.bbox;
    context.save();
    const shown: Marker[] = [];
    for (const marker of this.markers) {
      if (!Number.isFinite(marker.xHz)) continue;
      const x = u.valToPos(marker.xHz, 'x', true);
      if (x < left || x > left + width) continue;
      shown.push(marker);
      context.strokeStyle = marker.color;
      context.lineWidth = 1.5 * devicePixelRatio;
      context.setLineDash([6 * devicePixelRatio, 4 * devicePixelRatio]);
      context.beginPath();
      context.moveTo(x, top);
      context.lineTo(x, top + height);
      context.stroke();
    }
    const labelled = this.markerLabels ? shown : [];
    // Text width in the labels' own font, from the canvas: known even while the chart is hidden.
    context.font = MARKER_LABEL_FONT;
    const boxes = labelled.map((marker) => ({ lineX: u.valToPos(marker.xHz, 'x'), width: context.measureText(marker.label).width + MARKER_LABEL_PADDING_PX }));
    context.restore();
    const places = placeMarkerLabels(boxes, { width: width / devicePixelRatio, offset: MARKER_LABEL_OFFSET_PX, gap: MARKER_LABEL_GAP_PX });
    this.placeLabels(u, labelled, places);
    this.container.dataset.drawnAt = String(performance.now());
    this.container.dispatchEvent(new CustomEvent('rolloff:drawn', { bubbles: true, detail: { drawnAt: performance.now() } }));
  }
}

function seriesOptions(style: SeriesStyle, unit: string, engineering: boolean): uPlot.Series {
  const value = (_u: uPlot, v: number | null) => (v == null ? '—' : engineering ? formatEngineering(v, unit, 4) : `${formatFixed(v, 2)} ${unit}`);
  switch (style.kind) {
    case 'line':
      return { label: style.label, stroke: style.color, width: style.width ?? 2, spanGaps: true, points: { show: false }, value };
    case 'dashed':
      return { label: style.label, stroke: style.color, width: style.width ?? 1.5, dash: [8, 5], spanGaps: true, points: { show: false }, value };
    case 'band-edge':
      return { label: style.label, stroke: style.color, width: 0.5, spanGaps: true, points: { show: false }, value };
    case 'points-line':
      return { label: style.label, stroke: style.color, width: style.width ?? 1, spanGaps: true, points: { show: true, size: style.pointSize ?? 6, stroke: style.color, fill: style.color }, value };
    case 'points':
      return {
        label: style.label,
        stroke: style.color,
        width: 0,
        paths: () => null,
        points: { show: true, size: style.pointSize ?? 9, stroke: style.color, fill: style.color, width: 2 },
        value,
      };
  }
}
