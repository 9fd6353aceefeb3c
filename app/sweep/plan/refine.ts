/**
 * Refinement: after the coarse pass, extra frequencies that pin down the −3 dB
 * points and the measured gain-limit point. Each round puts one point at the
 * crossing interpolated in log f between the two points that bracket it, so
 * the bracket shrinks every round (interpolation search, a bisection that uses
 * the slope; common practice, no source).
 */
import { crossingsLogF, HALF_POWER_DB, passbandGainDb } from '../../analysis';

export interface RefineInput {
  frequencyHz: ArrayLike<number>;
  gainDb: ArrayLike<number>;
  /** Ideal-op-amp theory at the same frequencies, to find the gain-limit point; omit to skip it. */
  idealGainDb?: ArrayLike<number>;
  /** Stop refining a crossing once a measured point lies this close in log10 f (default 0.002 decade ≈ 0.5 %). */
  resolutionDecades?: number;
}

export function refinementFrequencies(input: RefineInput): number[] {
  const resolution = input.resolutionDecades ?? 0.002;
  const passband = passbandGainDb(input.frequencyHz, input.gainDb);
  const targets: number[] = [];
  if (passband !== undefined) targets.push(...crossingsLogF(input.frequencyHz, input.gainDb, passband + HALF_POWER_DB));
  if (input.idealGainDb) {
    const excessDb = Array.from(input.gainDb, (g, i) => g - input.idealGainDb![i]);
    const first = crossingsLogF(input.frequencyHz, excessDb, HALF_POWER_DB, 'falling')[0];
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
