/**
 * Bisection on log f (geometric midpoints) between two frequencies that
 * bracket a change of some property, so the crossing found does not depend on
 * the grid that bracketed it.
 */

/**
 * `onLowSide(f)` tells whether f is on the same side of the crossing as
 * `lowHz`. Returns the geometric middle of the last bracket after `steps` halvings.
 */
export function bisectLogF(lowHz: number, highHz: number, steps: number, onLowSide: (frequencyHz: number) => boolean): number {
  for (let k = 0; k < steps; k++) {
    const middleHz = Math.sqrt(lowHz * highHz);
    if (onLowSide(middleHz)) lowHz = middleHz;
    else highHz = middleHz;
  }
  return Math.sqrt(lowHz * highHz);
}
