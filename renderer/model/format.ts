/** Display formatting for views; numbers go through app/units, the one formatter. */
import { formatEngineering, formatFixed } from '../../app/units';

export { formatDuration, formatFixed } from '../../app/units';

export function formatHz(frequencyHz: number | undefined): string {
  return frequencyHz === undefined || !Number.isFinite(frequencyHz) ? '—' : formatEngineering(frequencyHz, 'Hz', 3);
}

export function formatDb(gainDb: number | undefined, digits = 2): string {
  return gainDb === undefined || !Number.isFinite(gainDb) ? '—' : `${formatFixed(gainDb, digits)} dB`;
}

/** A signed difference for figure tables, e.g. "+1.20 dB" or "−3.1 %". */
export function formatDelta(value: number | undefined, unit: string, digits = 2): string {
  if (value === undefined || !Number.isFinite(value)) return '—';
  const magnitude = formatFixed(Math.abs(value), digits);
  const sign = /^[0.]*$/.test(magnitude) ? '±' : value > 0 ? '+' : '−';
  return `${sign}${magnitude}${unit ? ' ' + unit : ''}`;
}

/** "reusing …" → "Reusing ….": a phrase of the vocabulary table as a sentence of the window. */
export function asSentence(text: string): string {
  return `${text[0].toUpperCase()}${text.slice(1)}.`;
}
