/**
 * The noise plot of a noise run: the measured output density with its 95 %
 * interval as a band, over the density computed for the build's circuit, on
 * log-log axes (uPlot). The chart tells tests what it drew: the number of
 * bins and uPlot's own scale kinds (distr 3 = logarithmic).
 */
import type { NoiseDensityColumns } from '../../app/contract/contract';
import { CURVE_NAMES, PLOT_PALETTE, TOLERANCE_BAND_OPACITY, withOpacity } from '../../app/contract/plot-palette';
import { h } from '../dom';
import { FrequencyChart } from './frequency-chart';

/** The one palette (app/contract/plot-palette.ts): the computed density is theory's, the measured one and its interval the measurement's. */
export const NOISE_COLORS = {
  computed: PLOT_PALETTE.theory,
  measured: PLOT_PALETTE.measured,
  band: withOpacity(PLOT_PALETTE.measured, TOLERANCE_BAND_OPACITY),
  bandEdge: withOpacity(PLOT_PALETTE.measured, 2 * TOLERANCE_BAND_OPACITY),
};

export class NoisePlot {
  readonly element: HTMLElement;
  private readonly chart: FrequencyChart;

  constructor() {
    const host = h('div', { className: 'chart', 'data-chart': 'noise-density' });
    this.element = h('div', { className: 'noise-plot', 'data-bins': '0', 'data-testid': 'noise-plot' }, host);
    this.chart = new FrequencyChart(host, {
      yLabel: 'Noise density (V/√Hz)',
      yUnit: 'V/√Hz',
      yLog: true,
      height: 340,
      // The computed curve last, so it is drawn over the measured one it should run through.
      series: [
        // One interval, one legend entry: its upper edge carries the name (as the Bode plot's tolerance band).
        { label: CURVE_NAMES.measuredInterval, color: NOISE_COLORS.bandEdge, kind: 'band-edge' },
        { label: `${CURVE_NAMES.measuredInterval} (lower edge)`, color: NOISE_COLORS.bandEdge, kind: 'band-edge', inLegend: false },
        { label: CURVE_NAMES.measured, color: NOISE_COLORS.measured, kind: 'line', width: 1.5 },
        { label: CURVE_NAMES.theory, color: NOISE_COLORS.computed, kind: 'line' },
      ],
      bands: [{ high: 1, low: 2, fill: NOISE_COLORS.band }],
    });
    this.element.dataset.xDistr = String(this.chart.plot.scales.x.distr);
    this.element.dataset.yDistr = String(this.chart.plot.scales.y.distr);
  }

  /** One shared frequency column (the band's bins): no alignment needed. */
  setDensity(density: NoiseDensityColumns): void {
    this.chart.setData([density.frequencyHz, density.high95VPerRtHz, density.low95VPerRtHz, density.measuredVPerRtHz, density.computedVPerRtHz]);
    this.element.dataset.bins = String(density.frequencyHz.length);
  }

  destroy(): void {
    this.chart.destroy();
  }
}
