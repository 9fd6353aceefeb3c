/**
 * Largest undistorted sine at the output: the rails clip it and the slew rate
 * bounds a sine of peak Vp to frequencies below SR/(2π·Vp) (full-power
 * bandwidth), so Vp ≤ min(rail headroom, SR/(2π·f)).
 */
import { AcSolver } from './ac-solver';
import { outputOpAmpIndex } from './output-opamp';
import type { Design, OpAmpModel } from './types';

/** Peak volts the output op-amp can deliver undistorted at `frequencyHz`; Infinity when nothing limits it. */
export function maxUndistortedOutputVpk(design: Design, frequencyHz: number): number {
  const index = outputOpAmpIndex(design);
  if (index === undefined) return Infinity;
  const model = (design.parts.filter((p) => p.type === 'opamp')[index] as { model: OpAmpModel }).model;
  const railVpk = model.rails === undefined ? Infinity : Math.min(-model.rails[0], model.rails[1]);
  const slewVpk = model.slewRate === undefined ? Infinity : model.slewRate / (2 * Math.PI * frequencyHz);
  return Math.min(railVpk, slewVpk);
}

/** Largest input peak that keeps the output undistorted: maxUndistortedOutputVpk / |H(f)|. */
export function stimulusLimitVpk(design: Design, frequencyHz: number): number {
  const solver = new AcSolver(design);
  solver.stamp('model');
  const h = new Float64Array(2);
  solver.transferAt(frequencyHz, h);
  return maxUndistortedOutputVpk(design, frequencyHz) / Math.hypot(h[0], h[1]);
}
