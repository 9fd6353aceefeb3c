/**
 * The one set of sweep defaults, used by the CLI (sweep, schedule, theory
 * --dc) and the window's Sweep view, so the same sweep asked for without
 * options is the same sweep everywhere. Values: common practice, no source
 * (a frequency sweep over the audio decades; a DC transfer over four decades
 * of input for the log stage; five whole cycles per acquisition).
 */
import type { SweepKind } from '../../contract/contract';

export const SWEEP_RANGE_DEFAULTS: Record<SweepKind, { from: number; to: number; pointsPerDecade: number; linearPoints: number }> = {
  // linearPoints: as many as the log grid over the same range, so switching the spacing keeps the work the same.
  ac: { from: 10, to: 100_000, pointsPerDecade: 10, linearPoints: 41 },
  dc: { from: 1e-3, to: 10, pointsPerDecade: 10, linearPoints: 41 },
};

export const SWEEP_DEFAULTS = {
  minCycles: 5,
  averages: 1,
  refine: true,
} as const;
