/**
 * Closed-loop peaking and a phase-margin estimate from an ordinary AC sweep.
 * The measured gain over the ideal-op-amp gain (both in dB, at the same
 * frequencies) is the loop's closed-loop factor T/(1 + T) for a stage whose
 * noise gain has the signal gain's shape (the inverting and non-inverting
 * stages: H = H_ideal·T/(1 + T), see DEVELOPERS.md, Theory); its peak above
 * its low-frequency value is the closed-loop peaking, and the second-order
 * relation between peaking and phase margin (app/signal/peaking-phase-margin.ts,
 * Ogata) turns it into a margin estimate.
 */
import { closedLoopPeakingDb, phaseMarginFromPeakingDb } from '../signal';

export interface MeasuredStability {
  /** Peak of (measured − ideal) gain above its first point, dB (0: no peaking). */
  closedLoopPeakingDb: number;
  phaseMarginEstimateDeg: number;
  /** No peaking seen: the margin is at least the estimate (65.5°, the second-order loop at ζ = 1/√2). */
  phaseMarginEstimateIsLowerBound: boolean;
}

/** `undefined` with fewer than 3 usable points (no peak can be told from a slope). */
export function measuredStability(gainDb: ArrayLike<number>, idealGainDb: ArrayLike<number>): MeasuredStability | undefined {
  const excessDb: number[] = [];
  for (let i = 0; i < gainDb.length; i++) {
    const excess = gainDb[i] - idealGainDb[i];
    if (Number.isFinite(excess)) excessDb.push(excess);
  }
  if (excessDb.length < 3) return undefined;
  const peakingDb = closedLoopPeakingDb(excessDb);
  const estimate = phaseMarginFromPeakingDb(peakingDb);
  return { closedLoopPeakingDb: peakingDb, phaseMarginEstimateDeg: estimate.phaseMarginDeg, phaseMarginEstimateIsLowerBound: estimate.lowerBoundOnly };
}
