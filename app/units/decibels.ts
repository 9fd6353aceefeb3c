/** Decibel and angle conversions: the one place they are computed. */

/** Voltage ratio → dB (20·log10). */
export function dbFromRatio(ratio: number): number {
  return 20 * Math.log10(Math.abs(ratio));
}

/** 20·log10(1/√2) ≈ −3.0103 dB: the half-power level that defines a −3 dB point. */
export const HALF_POWER_DB = dbFromRatio(Math.SQRT1_2);

/** dB → voltage ratio. */
export function ratioFromDb(gainDb: number): number {
  return 10 ** (gainDb / 20);
}

export function degreesFromRadians(angleRad: number): number {
  return (angleRad * 180) / Math.PI;
}

export function radiansFromDegrees(angleDeg: number): number {
  return (angleDeg * Math.PI) / 180;
}

/** Wraps a phase into (−180°, 180°]. */
export function wrapPhaseDeg(phaseDeg: number): number {
  let wrapped = phaseDeg % 360;
  if (wrapped > 180) wrapped -= 360;
  if (wrapped <= -180) wrapped += 360;
  return wrapped;
}

/**
 * Unwraps a phase sequence in place so consecutive values never jump by more
 * than 180°, keeping the curve continuous across ±180°.
 */
export function unwrapPhaseDeg(phasesDeg: Float64Array): Float64Array {
  for (let i = 1; i < phasesDeg.length; i++) {
    const step = phasesDeg[i] - phasesDeg[i - 1];
    phasesDeg[i] -= 360 * Math.round(step / 360);
  }
  return phasesDeg;
}
