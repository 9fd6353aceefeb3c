/**
 * Measured against theory, point by point: deviation and the tolerance band.
 */

/**
 * Coverage factor for calling a point outside the band: k = 3. The GUM's usual
 * k = 2 (≈95 %, JCGM 100:2008 §6.3, clause recalled from memory) would flag one
 * point in twenty by chance when the band is narrow (a build with measured part
 * values has almost no tolerance left); k = 3 (≈99.7 % for a normal
 * distribution) keeps chance flags rare (common practice, no source).
 */
export const COVERAGE_FACTOR = 3;

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
