/**
 * The curves of the Bode and DC transfer plots, in the order their columns are
 * given: names and colours from the one palette of window and records
 * (app/contract/plot-palette.ts). Pure data, so a unit test can read it.
 */
import { CURVE_NAMES, PLOT_PALETTE, TOLERANCE_BAND_OPACITY, withOpacity } from '../../app/contract/plot-palette';
import type { FrequencyChartOptions, SeriesStyle } from './frequency-chart';

/** The shared palette, with the band's translucent fill and edge for the canvas. */
export const PLOT_COLORS = {
  ...PLOT_PALETTE,
  band: withOpacity(PLOT_PALETTE.toleranceBand, TOLERANCE_BAND_OPACITY),
  bandEdge: withOpacity(PLOT_PALETTE.toleranceBand, 2 * TOLERANCE_BAND_OPACITY),
  gainLimit: PLOT_PALETTE.gainLimitTheory,
};

export const AC_GAIN_SERIES: SeriesStyle[] = [
  { label: CURVE_NAMES.theory, color: PLOT_COLORS.theory, kind: 'line' },
  // One band, one legend entry: its upper edge carries the name, the lower edge stays out of the legend.
  { label: CURVE_NAMES.toleranceBand, color: PLOT_COLORS.bandEdge, kind: 'band-edge' },
  { label: `${CURVE_NAMES.toleranceBand} (lower edge)`, color: PLOT_COLORS.bandEdge, kind: 'band-edge', inLegend: false },
  { label: CURVE_NAMES.ideal, color: PLOT_COLORS.ideal, kind: 'dashed' },
  { label: CURVE_NAMES.measured, color: PLOT_COLORS.measured, kind: 'points-line' },
  { label: CURVE_NAMES.distorted, color: PLOT_COLORS.distorted, kind: 'points', pointSize: 12 },
];

/** uPlot's 1-based series indexes of the band's upper and lower edge. */
export const AC_GAIN_BANDS: NonNullable<FrequencyChartOptions['bands']> = [{ high: 2, low: 3, fill: PLOT_COLORS.band }];

export const AC_PHASE_SERIES: SeriesStyle[] = [
  { label: CURVE_NAMES.theory, color: PLOT_COLORS.theory, kind: 'line' },
  { label: CURVE_NAMES.ideal, color: PLOT_COLORS.ideal, kind: 'dashed' },
  { label: CURVE_NAMES.measured, color: PLOT_COLORS.measured, kind: 'points-line' },
];

export const DC_TRANSFER_SERIES: SeriesStyle[] = [
  { label: CURVE_NAMES.theory, color: PLOT_COLORS.theory, kind: 'line' },
  { label: CURVE_NAMES.measured, color: PLOT_COLORS.measured, kind: 'points-line' },
  { label: CURVE_NAMES.distorted, color: PLOT_COLORS.distorted, kind: 'points', pointSize: 12 },
];
