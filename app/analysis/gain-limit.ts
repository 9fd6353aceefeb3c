/**
 * The measured gain-limit point: where the real op-amp's finite open-loop
 * gain takes over from the design.
 *
 * Definition used: the first frequency where the measured gain falls 3.01 dB
 * below the ideal-op-amp response of the same circuit. Why this is the loop-gain
 * = 1 point: H = H_ideal / (1 + NG/A); with a single-pole op-amp well above its
 * pole A ≈ GBW/(j f), so at |NG| = |A| the denominator is 1 + j and
 * |H/H_ideal| = 1/√2 (DESIGN.md "Theory": H = −(Z_F/Z_N)/(1 + (1 + Z_F/Z_N)/A)).
 */
import { crossingsLogF } from './crossing';
import { HALF_POWER_DB } from './passband';

export function measuredGainLimitHz(
  frequencyHz: ArrayLike<number>,
  gainDb: ArrayLike<number>,
  idealGainDb: ArrayLike<number>,
): number | undefined {
  const excessDb = new Float64Array(frequencyHz.length);
  for (let i = 0; i < excessDb.length; i++) excessDb[i] = gainDb[i] - idealGainDb[i];
  return crossingsLogF(frequencyHz, excessDb, HALF_POWER_DB, 'falling')[0];
}

/** Flags points above the theory's gain-limit point (the stage follows the op-amp there). */
export function pastGainLimit(frequencyHz: ArrayLike<number>, theoryGainLimitHz: number | undefined): boolean[] {
  return Array.from({ length: frequencyHz.length }, (_, i) => theoryGainLimitHz !== undefined && frequencyHz[i] > theoryGainLimitHz);
}
