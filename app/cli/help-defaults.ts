/**
 * Defaults as every command's help writes them: in engineering notation with
 * the unit ("10 Hz", "100 kHz", "1 mV"), the way they are typed, so `sweep`,
 * `schedule` and `theory` state the same default in the same words.
 */
import { formatEngineering } from '../units';
import { SWEEP_RANGE_DEFAULTS } from '../sweep/plan/defaults';

/** "default 10 Hz; DC 1 mV": the default start or end of an AC sweep, then of a DC one. */
export function sweepEndDefaultText(end: 'from' | 'to'): string {
  return `default ${formatEngineering(SWEEP_RANGE_DEFAULTS.ac[end], 'Hz')}; DC ${formatEngineering(SWEEP_RANGE_DEFAULTS.dc[end], 'V')}`;
}

/** "default 10" or "default 10; DC 5": points per decade of an AC sweep, and of a DC one when it differs. */
export function perDecadeDefaultText(): string {
  const { ac, dc } = SWEEP_RANGE_DEFAULTS;
  return ac.pointsPerDecade === dc.pointsPerDecade ? `default ${ac.pointsPerDecade}` : `default ${ac.pointsPerDecade}; DC ${dc.pointsPerDecade}`;
}
