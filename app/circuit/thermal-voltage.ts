/**
 * Thermal voltage VT = k·T/q with the exact SI values of k and q
 * (CODATA 2018 recommended values, exact since the 2019 SI redefinition).
 */
export const BOLTZMANN_J_PER_K = 1.380649e-23;
export const ELEMENTARY_CHARGE_C = 1.602176634e-19;
export const ZERO_CELSIUS_K = 273.15;

export function thermalVoltageV(temperatureC: number): number {
  return (BOLTZMANN_J_PER_K * (temperatureC + ZERO_CELSIUS_K)) / ELEMENTARY_CHARGE_C;
}
