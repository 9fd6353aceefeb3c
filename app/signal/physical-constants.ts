/**
 * Physical constants, exact by definition since the 2019 SI redefinition
 * (CODATA 2018 recommended values). The one place they are written down.
 */
export const BOLTZMANN_J_PER_K = 1.380649e-23;
export const ELEMENTARY_CHARGE_C = 1.602176634e-19;
export const ZERO_CELSIUS_K = 273.15;

/** Thermal voltage V_T = kT/q at a temperature in °C (≈ 25.693 mV at 25 °C). */
export function thermalVoltageV(temperatureC: number): number {
  return (BOLTZMANN_J_PER_K * (temperatureC + ZERO_CELSIUS_K)) / ELEMENTARY_CHARGE_C;
}
