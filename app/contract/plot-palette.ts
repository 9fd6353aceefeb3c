/**
 * One palette and one set of curve names for every plot: the window's charts
 * and the records' SVG and PDF plots draw the same curve in the same colour
 * under the same name. Colours are 6-digit hex (what SVG, PDF writers and the
 * canvas all accept); a translucent fill is a colour with TOLERANCE_BAND_OPACITY.
 *
 * Markers are coloured by figure (gain-limit point purple, −3 dB frequencies
 * green), a darker and a lighter shade for theory and measurement, so a
 * measured gain-limit point never looks like a measured −3 dB frequency.
 * Every colour that labels text reaches 4.5:1 on white (WCAG 2.1, SC 1.4.3;
 * test/unit/contract/plot-palette.test.ts).
 */

export const PLOT_PALETTE = {
  theory: '#1d4f91',
  ideal: '#69737c',
  measured: '#b35600',
  distorted: '#c0132d',
  /** Filled at TOLERANCE_BAND_OPACITY: the theory's colour, since the band is the theory's spread. */
  toleranceBand: '#1d4f91',
  gainLimitTheory: '#6b2fa3',
  gainLimitMeasured: '#a2267c',
  minus3dbTheory: '#0b7a55',
  minus3dbMeasured: '#5e7a0b',
  axis: '#33404d',
  grid: '#dde3e8',
  tick: '#b9c3cc',
} as const;

export const TOLERANCE_BAND_OPACITY = 0.18;

/** Curve names, the same in every legend. The tolerance band is one entry, whatever draws its two edges. */
export const CURVE_NAMES = {
  theory: 'Theory',
  ideal: 'Ideal op-amp',
  measured: 'Measured',
  distorted: 'Distorted',
  toleranceBand: 'Tolerance band',
  /** A noise run's density: the measured one's 95 % interval, filled in the measurement's colour. */
  measuredInterval: 'Measured, 95 % interval',
} as const;

/** Runs in a comparison: these eight in order, then evenly spread hues when there are more runs. */
export const RUN_COLOURS = ['#1d4f91', '#b35600', '#2e7d4f', '#7b3fa0', '#a3162b', '#127a86', '#6e5a12', '#555555'] as const;

export function runColour(index: number, count: number): string {
  if (count <= RUN_COLOURS.length) return RUN_COLOURS[index % RUN_COLOURS.length];
  const hue = (index * 360) / count + 20;
  return hslToHex(hue % 360, 0.7, index % 2 === 0 ? 0.38 : 0.46);
}

/** "#rrggbb" with an alpha, as CSS rgba() for the canvas. */
export function withOpacity(hex: string, opacity: number): string {
  const [r, g, b] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16));
  return `rgba(${r}, ${g}, ${b}, ${opacity})`;
}

/** HSL to sRGB hex (CSS Color Module Level 4, "HSL to RGB"). */
function hslToHex(hueDeg: number, saturation: number, lightness: number): string {
  const f = (n: number) => {
    const k = (n + hueDeg / 30) % 12;
    const a = saturation * Math.min(lightness, 1 - lightness);
    const value = lightness - a * Math.max(-1, Math.min(k - 3, 9 - k, 1));
    return Math.round(value * 255).toString(16).padStart(2, '0');
  };
  return `#${f(0)}${f(8)}${f(4)}`;
}
