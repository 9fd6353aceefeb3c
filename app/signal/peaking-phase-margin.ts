/**
 * Phase margin estimated from measured closed-loop peaking, through the
 * standard second-order loop T(s) = ωn²/(s·(s + 2ζωn)), whose closed loop is
 * ωn²/(s² + 2ζωn·s + ωn²). For that loop (K. Ogata, "Modern Control
 * Engineering", 5th ed., Prentice Hall 2010, §7-3 resonant peak and §7-7
 * phase margin; recalled from memory, re-derived from the transfer function):
 *   resonant peak Mr = 1/(2ζ·√(1 − ζ²))  for ζ ≤ 1/√2 (no peak above),
 *   phase margin  PM = atan(2ζ / √(√(1 + 4ζ⁴) − 2ζ²)).
 * A real stage is only near this form when its loop has one dominant pole
 * and one more pole near the crossover; treat the result as an estimate.
 */

export interface PhaseMarginEstimate {
  /** Damping ratio ζ of the equivalent second-order loop. */
  dampingRatio: number;
  phaseMarginDeg: number;
  /** True when there is no peaking: ζ ≥ 1/√2, so the margin is at least `phaseMarginDeg` (65.5°). */
  lowerBoundOnly: boolean;
}

const DEG_PER_RAD = 180 / Math.PI;

/** PM of the second-order loop with damping ζ, degrees. */
export function phaseMarginFromDamping(dampingRatio: number): number {
  const z2 = dampingRatio * dampingRatio;
  return Math.atan((2 * dampingRatio) / Math.sqrt(Math.sqrt(1 + 4 * z2 * z2) - 2 * z2)) * DEG_PER_RAD;
}

/** Resonant peak of the second-order closed loop, dB (0 for ζ ≥ 1/√2). */
export function peakingDbFromDamping(dampingRatio: number): number {
  if (dampingRatio >= Math.SQRT1_2) return 0;
  return 20 * Math.log10(1 / (2 * dampingRatio * Math.sqrt(1 - dampingRatio * dampingRatio)));
}

/** Inverts Mr = 1/(2ζ√(1−ζ²)): ζ² = (1 − √(1 − 1/Mr²))/2, the root with ζ ≤ 1/√2. */
export function phaseMarginFromPeakingDb(peakingDb: number): PhaseMarginEstimate {
  if (!Number.isFinite(peakingDb)) throw new RangeError(`closed-loop peaking ${peakingDb} dB is not a number`);
  if (peakingDb <= 0) return { dampingRatio: Math.SQRT1_2, phaseMarginDeg: phaseMarginFromDamping(Math.SQRT1_2), lowerBoundOnly: true };
  const mr = 10 ** (peakingDb / 20);
  const dampingRatio = Math.sqrt((1 - Math.sqrt(1 - 1 / (mr * mr))) / 2);
  return { dampingRatio, phaseMarginDeg: phaseMarginFromDamping(dampingRatio), lowerBoundOnly: false };
}

/** Measured peaking of a closed-loop gain column: its maximum above its first (low-frequency) point, dB, at least 0. */
export function closedLoopPeakingDb(gainDb: ArrayLike<number>): number {
  let peak = -Infinity;
  for (let i = 0; i < gainDb.length; i++) if (gainDb[i] > peak) peak = gainDb[i];
  return Math.max(0, peak - gainDb[0]);
}
