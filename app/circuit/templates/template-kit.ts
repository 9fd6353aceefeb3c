/**
 * Shared pieces of the design templates: the parameter table type, the
 * generic op-amp model and part constructors producing design-file JSON.
 */
import type { TemplateInfo } from '../../contract/contract';

export type TemplateParameters = TemplateInfo['parameters'];

export interface DesignTemplate extends TemplateInfo {
  /** Builds the design-file JSON from complete parameters (defaults filled in). */
  build(p: Record<string, number>): DesignFile;
}

/** The design-file shape the templates write (see app/circuit/types.ts for meanings). */
export interface DesignFile {
  name: string;
  description: string;
  input: string;
  output: string;
  temperatureC: number;
  parts: Array<Record<string, unknown>>;
}

/**
 * A generic op-amp (A0 = 1e5, GBW = 1 MHz, SR = 0.5 V/µs, rails ±12 V):
 * round numbers typical of general-purpose parts, not any particular product.
 */
export const OPAMP_PARAMETERS: TemplateParameters = [
  { name: 'openLoopGain', description: 'op-amp DC open-loop gain A0', defaultValue: 1e5, unit: 'V/V' },
  { name: 'gbw', description: 'op-amp gain-bandwidth product', defaultValue: 1e6, unit: 'Hz' },
  { name: 'slewRate', description: 'op-amp slew rate', defaultValue: 0.5e6, unit: 'V/s' },
  { name: 'railV', description: 'op-amp output swing limit, ± volts', defaultValue: 12, unit: 'V' },
];

export const TOLERANCE_PARAMETERS: TemplateParameters = [
  { name: 'resistorTolerance', description: 'relative tolerance of every resistor (0.01 = ±1 %)', defaultValue: 0.01, unit: '' },
  { name: 'capacitorTolerance', description: 'relative tolerance of every capacitor (0.05 = ±5 %)', defaultValue: 0.05, unit: '' },
];

export function opamp(id: string, noninverting: string, inverting: string, output: string, p: Record<string, number>): Record<string, unknown> {
  return {
    id,
    type: 'opamp',
    nodes: [noninverting, inverting, output],
    model: { openLoopGain: p.openLoopGain, gbw: p.gbw, slewRate: p.slewRate, rails: [-p.railV, p.railV] },
  };
}

export function resistor(id: string, a: string, b: string, ohms: number, p: Record<string, number>): Record<string, unknown> {
  return { id, type: 'resistor', nodes: [a, b], value: ohms, tolerance: p.resistorTolerance };
}

export function capacitor(id: string, a: string, b: string, farads: number, p: Record<string, number>): Record<string, unknown> {
  return { id, type: 'capacitor', nodes: [a, b], value: farads, tolerance: p.capacitorTolerance };
}

export function designFile(name: string, description: string, parts: Array<Record<string, unknown>>): DesignFile {
  return { name, description, input: 'in', output: 'out', temperatureC: 25, parts };
}
