/** Display formatting for views; numbers go through app/units, the one formatter. */
import { formatEngineering } from '../../app/units';

export function formatHz(frequencyHz: number | undefined): string {
  return frequencyHz === undefined || !Number.isFinite(frequencyHz) ? '—' : formatEngineering(frequencyHz, 'Hz', 3);
}

export function formatDb(gainDb: number | undefined, digits = 2): string {
  return gainDb === undefined || !Number.isFinite(gainDb) ? '—' : `${gainDb.toFixed(digits)} dB`;
}

/** "45 s", "3 min 05 s", "2 h 10 min": the resolution a bench user plans with. */
export function formatDuration(seconds: number | undefined): string {
  if (seconds === undefined || !Number.isFinite(seconds) || seconds < 0) return '—';
  const whole = Math.round(seconds);
  if (whole < 60) return `${whole} s`;
  const minutes = Math.floor(whole / 60);
  if (minutes < 60) return `${minutes} min ${String(whole % 60).padStart(2, '0')} s`;
  return `${Math.floor(minutes / 60)} h ${String(minutes % 60).padStart(2, '0')} min`;
}

/** A signed difference for figure tables, e.g. "+1.20 dB" or "−3.1 %". */
export function formatDelta(value: number | undefined, unit: string, digits = 2): string {
  if (value === undefined || !Number.isFinite(value)) return '—';
  const sign = value > 0 ? '+' : value < 0 ? '−' : '±';
  return `${sign}${Math.abs(value).toFixed(digits)}${unit ? ' ' + unit : ''}`;
}
