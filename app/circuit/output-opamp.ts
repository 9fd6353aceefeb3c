import type { Design } from './types';

/** Index among the design's op-amps of the one driving the output node, else the first; undefined without op-amps. */
export function outputOpAmpIndex(design: Design): number | undefined {
  const opamps = design.parts.filter((p) => p.type === 'opamp');
  if (opamps.length === 0) return undefined;
  const driving = opamps.findIndex((p) => p.nodes[2] === design.output);
  return driving >= 0 ? driving : 0;
}
