import type { Design, PassivePart } from './types';

/** The resistor with one end on the design's input node (the log stage's input resistor R, I = V_in/R). */
export function inputResistor(design: Design): PassivePart | undefined {
  return design.parts.find((p): p is PassivePart => p.type === 'resistor' && (p.nodes as string[]).includes(design.input));
}
