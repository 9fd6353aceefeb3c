/**
 * Diode-feedback log stage with an ideal op-amp: the input current I = Vin/R
 * flows through the diode, so Vout = −(n·VT·ln(I/IS + 1) + I·RS).
 */
import { thermalVoltageV } from './thermal-voltage';
import type { DiodeModel } from './types';

export function logStageIdeal(inputV: number, resistanceOhm: number, diode: DiodeModel, temperatureC: number): number {
  const currentA = inputV / resistanceOhm;
  return -(diode.n * thermalVoltageV(temperatureC) * Math.log(currentA / diode.is + 1) + currentA * diode.rs);
}
