/**
 * Open-loop gain of the op-amp macro-model:
 * A(s) = A0 / ((1 + s·A0/(2π·GBW)) · (1 + s/(2π·f2))), the second factor only
 * when a second pole is given. Same model as the MNA stamps and the SPICE netlist.
 */
import type { OpAmpModel } from './types';

/** Writes A(j·2π·f) into out[0] (real) and out[1] (imaginary). */
export function openLoopGainAt(model: OpAmpModel, frequencyHz: number, out: Float64Array): void {
  const a0 = model.openLoopGain;
  // (1 + j·x1)(1 + j·x2) = (1 − x1·x2) + j(x1 + x2)
  const x1 = (frequencyHz * a0) / model.gbw;
  const x2 = model.secondPoleHz === undefined ? 0 : frequencyHz / model.secondPoleHz;
  const dr = 1 - x1 * x2;
  const di = x1 + x2;
  const d = dr * dr + di * di;
  out[0] = (a0 * dr) / d;
  out[1] = (-a0 * di) / d;
}
