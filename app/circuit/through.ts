/**
 * The simulated bench's through connection for a through-calibration run: the
 * build's circuit stays connected (so the generator sees the same load), and
 * the meter reads the stage input instead of its output — through a 1 mΩ link
 * into a 1 GΩ meter input, both negligible (1e-3/1e9 relative).
 */
import type { Design } from './types';

export const THROUGH_NODE = 'through_meter';

export function throughDesign(design: Design): Design {
  return {
    ...design,
    name: `${design.name} (through connection)`,
    output: THROUGH_NODE,
    parts: [
      ...design.parts,
      { id: 'THROUGH_LINK', type: 'resistor', nodes: [design.input, THROUGH_NODE], value: 1e-3 },
      { id: 'THROUGH_METER', type: 'resistor', nodes: [THROUGH_NODE, '0'], value: 1e9 },
    ],
  };
}
