/**
 * Settling and integration times per step.
 *
 * A first-order transient decays as e^(−t/τ), so waiting t = −ln(ε)·τ leaves a
 * fraction ε of the step (handbook: RC step response). For ε = 0.1 %:
 * −ln(0.001) = 6.91, i.e. about 7 τ (e^−7 ≈ 0.09 %).
 */

export const DEFAULT_SETTLE_FRACTION = 1e-3;

export function settleTimeS(slowestTimeConstantS: number, instrumentSettleS: number, settleFraction = DEFAULT_SETTLE_FRACTION): number {
  const circuitS = -Math.log(settleFraction) * Math.max(0, slowestTimeConstantS);
  return Math.max(circuitS, instrumentSettleS);
}

/**
 * One acquisition over whole cycles: at least `minCycles` and at least the
 * instrument's shortest acquisition, rounded up to a whole number of periods
 * so a sine fit or an RMS reading sees no partial cycle (IEEE Std 1057 fits
 * are best conditioned over whole cycles; common practice).
 */
export function integrationTimeS(frequencyHz: number, minCycles: number, minIntegrationS: number): number {
  const periodS = 1 / frequencyHz;
  const cycles = Math.max(minCycles, Math.ceil(minIntegrationS / periodS - 1e-9));
  return Math.ceil(cycles - 1e-9) * periodS;
}
