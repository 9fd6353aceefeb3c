/**
 * Axes for record plots: log axes snap to whole decades with a grid line at
 * every decade (major) and at 2…9 × each decade (minor); linear axes use
 * 1-2-5 steps. One place maps values to the 0…1 span of an axis, shared by the
 * SVG and PDF plots so both draw the same picture.
 */
import { formatEngineering, withTrueMinus } from '../units';

export type AxisScale = 'log' | 'linear';

export interface AxisTick {
  value: number;
  /** null for minor ticks, which get a grid line but no label. */
  label: string | null;
  major: boolean;
}

export interface Axis {
  scale: AxisScale;
  min: number;
  max: number;
  /** Axis title with its unit, e.g. "Frequency (Hz)". */
  title: string;
  ticks: AxisTick[];
}

function finiteValues(values: Iterable<number | null>, positiveOnly: boolean): number[] {
  const kept: number[] = [];
  for (const v of values) if (v !== null && Number.isFinite(v) && (!positiveOnly || v > 0)) kept.push(v);
  return kept;
}

/** Log axis spanning whole decades around the positive values given. */
export function logAxis(values: Iterable<number | null>, title: string, unit: string): Axis {
  const kept = finiteValues(values, true);
  let lowDecade = kept.length ? Math.floor(Math.log10(Math.min(...kept)) + 1e-9) : 0;
  let highDecade = kept.length ? Math.ceil(Math.log10(Math.max(...kept)) - 1e-9) : 1;
  if (highDecade <= lowDecade) highDecade = lowDecade + 1;
  const ticks: AxisTick[] = [];
  for (let decade = lowDecade; decade <= highDecade; decade++) {
    const base = 10 ** decade;
    ticks.push({ value: base, label: formatEngineering(base, unit, 3), major: true });
    if (decade < highDecade) for (let m = 2; m <= 9; m++) ticks.push({ value: m * base, label: null, major: false });
  }
  return { scale: 'log', min: 10 ** lowDecade, max: 10 ** highDecade, title, ticks };
}

/** Linear axis with 1-2-5 steps covering the values, padded so points do not sit on the frame. */
export function linearAxis(values: Iterable<number | null>, title: string, unit: string, targetTickCount = 6): Axis {
  const kept = finiteValues(values, false);
  let low = kept.length ? Math.min(...kept) : 0;
  let high = kept.length ? Math.max(...kept) : 1;
  if (high - low < 1e-12 * Math.max(1, Math.abs(high))) {
    const pad = Math.abs(high) > 0 ? Math.abs(high) * 0.1 : 1;
    low -= pad;
    high += pad;
  }
  const step = niceStep((high - low) / targetTickCount);
  const min = Math.floor(low / step - 1e-9) * step;
  const max = Math.ceil(high / step + 1e-9) * step;
  const ticks: AxisTick[] = [];
  for (let i = 0; min + i * step <= max + step * 1e-6; i++) {
    const value = Number((min + i * step).toPrecision(12));
    ticks.push({ value, label: unit ? formatEngineering(value, unit, 4) : withTrueMinus(Number(value.toPrecision(6)).toString()), major: true });
  }
  return { scale: 'linear', min, max, title, ticks };
}

function niceStep(rough: number): number {
  const exponent = Math.floor(Math.log10(rough));
  const fraction = rough / 10 ** exponent;
  const nice = fraction <= 1 ? 1 : fraction <= 2 ? 2 : fraction <= 5 ? 5 : 10;
  return nice * 10 ** exponent;
}

/** Position of a value along the axis, 0 at min and 1 at max; NaN if it cannot be placed (≤ 0 on a log axis). */
export function axisFraction(axis: Axis, value: number | null): number {
  if (value === null || !Number.isFinite(value)) return Number.NaN;
  if (axis.scale === 'log') {
    if (value <= 0) return Number.NaN;
    return Math.log10(value / axis.min) / Math.log10(axis.max / axis.min);
  }
  return (value - axis.min) / (axis.max - axis.min);
}
