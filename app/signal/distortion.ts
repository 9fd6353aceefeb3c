/**
 * How far a record is from a clean sine. A slew-limited output turns towards a
 * triangle and a clipped one flattens; both leave a residual that noise alone
 * would not, relative to the sine's own RMS.
 */
import type { SineFit } from './sine-fit';

/**
 * Residual RMS over the fitted sine's RMS (A/√2). 0 for a perfect sine; a full
 * triangle wave scores about 0.12, a sine clipped at 80 % of its peak about 0.09.
 */
export function distortionScore(fit: SineFit): number {
  const sineRmsV = fit.amplitudeV / Math.SQRT2;
  return sineRmsV > 0 ? fit.residualRmsV / sineRmsV : Number.POSITIVE_INFINITY;
}

/**
 * Default limit above which a point is flagged distorted: 3 % (≈ −30 dB).
 * Common practice, no source: well above the residual of a clean record at
 * bench SNR (≥ 40 dB gives ≤ 1 %), well below slew limiting or hard clipping.
 */
export const DISTORTION_SCORE_LIMIT = 0.03;

export function looksDistorted(fit: SineFit, limit: number = DISTORTION_SCORE_LIMIT): boolean {
  return distortionScore(fit) > limit;
}
