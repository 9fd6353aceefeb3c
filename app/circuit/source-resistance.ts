/**
 * A design driven through a source resistance: the ideal input source moves to
 * a new node behind a resistor into the design's input, so every analysis
 * (AC, DC, noise) sees the source's resistance — the loading of a 50 Ω
 * generator by the stage's input impedance, and that resistance's own thermal
 * noise when the generator's output is off but still connected (or the input
 * is terminated with a resistor of that value).
 */
import type { Design } from './types';

export const SOURCE_EMF_NODE = '__generator_emf';
export const SOURCE_RESISTOR_ID = '__generator_source_resistance';

export function withSourceResistance(design: Design, sourceOhm: number): Design {
  return {
    ...design,
    input: SOURCE_EMF_NODE,
    parts: [...design.parts, { id: SOURCE_RESISTOR_ID, type: 'resistor', nodes: [SOURCE_EMF_NODE, design.input], value: sourceOhm }],
  };
}
