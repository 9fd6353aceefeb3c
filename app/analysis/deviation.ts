/**
 * Measured against theory, point by point: deviation and the tolerance band.
 */

/** Coverage factor for the expanded uncertainty, k = 2 (≈95 %) as in the GUM, JCGM 100:2008 §6.3 (clause recalled from memory). */
export const COVERAGE_FACTOR = 2;

/** measured − theory in dB, per point. */
export function deviationDb(measuredGainDb: ArrayLike<number>, theoryGainDb: ArrayLike<number>): Float64Array {
  const out = new Float64Array(measuredGainDb.length);
  for (let i = 0; i < out.length; i++) out[i] = measuredGainDb[i] - theoryGainDb[i];
  return out;
}

/**
 * True where the measured gain lies outside the Monte Carlo tolerance band by
 * more than its expanded uncertainty (a point is only called outside when the
 * measurement can tell).
 */
export function outsideBand(
  measuredGainDb: ArrayLike<number>,
  gainUncertaintyDb: ArrayLike<number>,
  bandLowDb: ArrayLike<number>,
  bandHighDb: ArrayLike<number>,
): boolean[] {
  return Array.from({ length: measuredGainDb.length }, (_, i) => {
    const u = COVERAGE_FACTOR * (Number.isFinite(gainUncertaintyDb[i]) ? gainUncertaintyDb[i] : 0);
    return measuredGainDb[i] < bandLowDb[i] - u || measuredGainDb[i] > bandHighDb[i] + u;
  });
}

/** Largest |deviation| over the points where `include` is true; with its frequency. */
export function largestDeviation(
  frequencyHz: ArrayLike<number>,
  deviationsDb: ArrayLike<number>,
  include: (index: number) => boolean,
): { deviationDb: number; frequencyHz: number } | undefined {
  let best: { deviationDb: number; frequencyHz: number } | undefined;
  for (let i = 0; i < deviationsDb.length; i++) {
    if (!include(i) || !Number.isFinite(deviationsDb[i])) continue;
    if (!best || Math.abs(deviationsDb[i]) > Math.abs(best.deviationDb)) best = { deviationDb: deviationsDb[i], frequencyHz: frequencyHz[i] };
  }
  return best;
}
