/**
 * Generator amplitude conversions. Generators are calibrated for a load
 * setting: with '50-ohm' the displayed amplitude is what appears across a
 * matched 50 Ω load, so the open-circuit voltage (EMF behind the 50 Ω source)
 * is twice the display; with 'high-z' the display is the open-circuit voltage.
 * Formula: V_load = V_emf · R_load / (R_load + R_source) (voltage divider).
 */
import type { LoadSetting } from './roles';

/** Sine only: Vpp = 2√2 · Vrms. */
export function vppFromVrms(vrms: number): number {
  return 2 * Math.SQRT2 * vrms;
}

export function vrmsFromVpp(vpp: number): number {
  return vpp / (2 * Math.SQRT2);
}

/** A sine's peak-to-peak volts in the unit a profile's amplitude command takes. */
export function amplitudeInUnit(amplitudeVpp: number, unit: 'Vpp' | 'Vrms' | 'Vpk'): number {
  if (unit === 'Vrms') return vrmsFromVpp(amplitudeVpp);
  if (unit === 'Vpk') return amplitudeVpp / 2;
  return amplitudeVpp;
}

/** Open-circuit voltage per displayed volt for a load setting. */
export function openCircuitFactor(load: LoadSetting): number {
  return load === '50-ohm' ? 2 : 1;
}

/** Voltage across `loadOhm` driven by `emfV` through `sourceOhm`. */
export function voltageIntoLoad(emfV: number, loadOhm: number, sourceOhm: number): number {
  if (!Number.isFinite(loadOhm)) return emfV;
  return (emfV * loadOhm) / (loadOhm + sourceOhm);
}

/**
 * The figure the user's maximum stimulus is compared with: twice the largest
 * instantaneous open-circuit voltage, i.e. peak-to-peak with |offset| counted
 * as peak — 2·(Vpp/2 + |offset|)·factor. Open-circuit because the circuit's
 * input may be high impedance whatever the load setting says.
 */
export function worstCaseStimulusVpp(amplitudeVpp: number, offsetV: number, load: LoadSetting): number {
  return openCircuitFactor(load) * (Math.abs(amplitudeVpp) + 2 * Math.abs(offsetV));
}
