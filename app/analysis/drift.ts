/**
 * Drift across repeated runs of one build (a schedule): how each figure moved
 * from the first run to the last, and its spread.
 */
import type { RunFigures } from '../contract/contract';

export interface DriftRow {
  figure: 'passbandGainDb' | 'minus3dbHz' | 'gainLimitHz' | 'rolloffDbPerDecade' | 'maxDeviationDb';
  unit: 'dB' | 'Hz' | 'dB/decade';
  values: Array<number | undefined>;
  first?: number;
  last?: number;
  /** last − first. */
  change?: number;
  /** max − min over the runs where the figure exists. */
  spread?: number;
}

const FIGURES: Array<[DriftRow['figure'], DriftRow['unit'], (f: RunFigures) => number | undefined]> = [
  ['passbandGainDb', 'dB', (f) => f.passbandGainDb],
  ['minus3dbHz', 'Hz', (f) => f.minus3dbHz[0]],
  ['gainLimitHz', 'Hz', (f) => f.gainLimitHz],
  ['rolloffDbPerDecade', 'dB/decade', (f) => f.rolloffDbPerDecade],
  ['maxDeviationDb', 'dB', (f) => f.maxDeviationDb],
];

export function driftSummary(figures: RunFigures[]): DriftRow[] {
  return FIGURES.map(([figure, unit, pick]) => {
    const values = figures.map(pick);
    const present = values.filter((v): v is number => v !== undefined && Number.isFinite(v));
    const row: DriftRow = { figure, unit, values };
    if (present.length > 0) {
      row.first = present[0];
      row.last = present[present.length - 1];
      row.change = row.last - row.first;
      row.spread = Math.max(...present) - Math.min(...present);
    }
    return row;
  });
}
