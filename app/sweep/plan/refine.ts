/**
 * Refinement: after the coarse pass, extra frequencies that pin down the −3 dB
 * points and the measured gain-limit point. Each round puts one point at the
 * crossing interpolated in log f between the two points that bracket it, so
 * the bracket shrinks every round (interpolation search, a bisection that uses
 * the slope; common practice, no source).
 */
import { crossingsLogF, HALF_POWER_DB, loopGainLimitHz, magnitudeGainLimitHz, passbandGainDb } from '../../analysis';

export interface RefineInput {
  frequencyHz: ArrayLike<number>;
  gainDb: ArrayLike<number>;
  /** Ideal-op-amp theory at the same frequencies, to find the gain-limit point; omit to skip it. */
  idealGainDb?: ArrayLike<number>;
  /** Measured and ideal phases: with them the gain-limit point is found from the loop gain (app/analysis). */
  phaseDeg?: ArrayLike<number>;
  idealPhaseDeg?: ArrayLike<number>;
  /** Stop refining a crossing once a measured point lies this close in log10 f (default 0.002 decade ≈ 0.5 %). */
  resolutionDecades?: number;
}

export function refinementFrequencies(input: RefineInput): number[] {
  const resolution = input.resolutionDecades ?? 0.002;
  const passband = passbandGainDb(input.frequencyHz, input.gainDb);
  const targets: number[] = [];
  if (passband !== undefined) targets.push(...crossingsLogF(input.frequencyHz, input.gainDb, passband + HALF_POWER_DB));
  if (input.idealGainDb) {
    const withPhase = input.phaseDeg && input.idealPhaseDeg && Array.from(input.phaseDeg).every(Number.isFinite);
    const first = withPhase
      ? loopGainLimitHz(input.frequencyHz, input.gainDb, input.phaseDeg!, input.idealGainDb, input.idealPhaseDeg!)
      : magnitudeGainLimitHz(input.frequencyHz, input.gainDb, input.idealGainDb);
    if (first !== undefined) targets.push(first);
  }
  const existing = Array.from(input.frequencyHz, (f) => Math.log10(f));
  const chosen: number[] = [];
  for (const target of targets) {
    const logTarget = Math.log10(target);
    const near = (l: number) => Math.abs(l - logTarget) < resolution;
    if (existing.some(near) || chosen.some((c) => near(Math.log10(c)))) continue;
    chosen.push(target);
  }
  return chosen.sort((a, b) => a - b);
}
