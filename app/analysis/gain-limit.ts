/**
 * The measured gain-limit point: where the real op-amp's finite open-loop
 * gain takes over from the design, i.e. where the loop gain T = A/NG falls to 1.
 *
 * From the feedback relation H = H_ideal / (1 + NG/A) = H_ideal · T/(1 + T)
 * (DEVELOPERS.md "Theory"), the loop gain follows from the measured complex H and
 * the ideal-op-amp response of the same circuit: T = 1/(H_ideal/H − 1). Its
 * magnitude crossing 0 dB is the gain-limit point, with no op-amp model assumed.
 *
 * Without phase (meter runs) only magnitudes are known; then the point is taken
 * where |H/H_ideal| = 1/√2, which is the same point when NG is real (a resistive
 * stage: A ≈ GBW/(j f) makes the denominator 1 + j there) but earlier when NG
 * has phase (reactive feedback) — so the phase method is used whenever it can be.
 */
import { dbFromRatio, radiansFromDegrees, ratioFromDb } from '../units';
import { crossingsLogF } from './crossing';
import { HALF_POWER_DB } from './passband';

/** |T| in dB per point from measured and ideal gain/phase; NaN where a value is missing. */
export function measuredLoopGainDb(
  gainDb: ArrayLike<number>,
  phaseDeg: ArrayLike<number>,
  idealGainDb: ArrayLike<number>,
  idealPhaseDeg: ArrayLike<number>,
): Float64Array {
  const out = new Float64Array(gainDb.length);
  for (let i = 0; i < out.length; i++) {
    // q = H_ideal/H = (|H_ideal|/|H|)·e^{j(φ_ideal − φ)}; T = 1/(q − 1).
    const magnitude = ratioFromDb(idealGainDb[i] - gainDb[i]);
    const angle = radiansFromDegrees(idealPhaseDeg[i] - phaseDeg[i]);
    const distance = Math.hypot(magnitude * Math.cos(angle) - 1, magnitude * Math.sin(angle));
    out[i] = Number.isFinite(distance) ? -dbFromRatio(distance) : NaN;
  }
  return out;
}

/** First frequency where the measured loop gain falls through 0 dB (phase method). */
export function loopGainLimitHz(
  frequencyHz: ArrayLike<number>,
  gainDb: ArrayLike<number>,
  phaseDeg: ArrayLike<number>,
  idealGainDb: ArrayLike<number>,
  idealPhaseDeg: ArrayLike<number>,
): number | undefined {
  return crossingsLogF(frequencyHz, measuredLoopGainDb(gainDb, phaseDeg, idealGainDb, idealPhaseDeg), 0, 'falling')[0];
}

/** Magnitude-only estimate (see file comment): where |H/H_ideal| falls to 1/√2. */
export function magnitudeGainLimitHz(
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
