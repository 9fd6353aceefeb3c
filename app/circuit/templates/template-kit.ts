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
 * Parameter names follow one rule: the symbol the trade writes, in lower case —
 * a part's value by its part id (rf for RF, r1 for R1; r and c where one value
 * sets several equal parts), the op-amp by its data-sheet symbols (a0, gbw, sr,
 * rail), the diode by its model's (is, n, rs), tolerances as rtol and ctol.
 * Values are SI, except the slew rate in V/µs as data sheets give it.
 */

/** A generic op-amp (A0 = 1e5, GBW = 1 MHz, SR = 0.5 V/µs, rails ±12 V): round numbers typical of general-purpose parts, not any particular product. */
export const OPAMP_PARAMETERS: TemplateParameters = [
  { name: 'a0', description: 'op-amp DC open-loop gain A0', defaultValue: 1e5, unit: 'V/V' },
  { name: 'gbw', description: 'op-amp gain-bandwidth product GBW', defaultValue: 1e6, unit: 'Hz' },
  { name: 'sr', description: 'op-amp slew rate SR', defaultValue: 0.5, unit: 'V/µs' },
  { name: 'rail', description: 'op-amp output swing limit, ± volts', defaultValue: 12, unit: 'V' },
];

/** V/µs of the sr parameter → V/s of the design file. */
const VOLTS_PER_SECOND_PER_V_PER_US = 1e6;

/** Listed by a template for the part kinds it has (templates/index.ts), so no template offers a tolerance for a part it lacks. */
export const TOLERANCE_PARAMETER_OF_KIND: Record<'resistor' | 'capacitor', TemplateParameters[number]> = {
  resistor: { name: 'rtol', description: 'relative tolerance of every resistor (0.01 = ±1 %)', defaultValue: 0.01, unit: '' },
  capacitor: { name: 'ctol', description: 'relative tolerance of every capacitor (0.05 = ±5 %)', defaultValue: 0.05, unit: '' },
};

export function opamp(id: string, noninverting: string, inverting: string, output: string, p: Record<string, number>): Record<string, unknown> {
  return {
    id,
    type: 'opamp',
    nodes: [noninverting, inverting, output],
    model: { openLoopGain: p.a0, gbw: p.gbw, slewRate: p.sr * VOLTS_PER_SECOND_PER_V_PER_US, rails: [-p.rail, p.rail] },
  };
}

export function resistor(id: string, a: string, b: string, ohms: number, p: Record<string, number>): Record<string, unknown> {
  return { id, type: 'resistor', nodes: [a, b], value: ohms, tolerance: p[TOLERANCE_PARAMETER_OF_KIND.resistor.name] };
}

export function capacitor(id: string, a: string, b: string, farads: number, p: Record<string, number>): Record<string, unknown> {
  return { id, type: 'capacitor', nodes: [a, b], value: farads, tolerance: p[TOLERANCE_PARAMETER_OF_KIND.capacitor.name] };
}

export function designFile(name: string, description: string, parts: Array<Record<string, unknown>>): DesignFile {
  return { name, description, input: 'in', output: 'out', temperatureC: 25, parts };
}
