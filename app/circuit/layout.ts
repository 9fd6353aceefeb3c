/**
 * Modified nodal analysis layout: which unknown each node, inductor current
 * and op-amp state gets. The input node is driven by an ideal source, so its
 * voltage is known and it gets no unknown (its terms move to the right-hand
 * side); ground gets none either.
 *
 * Unknowns, in order: node voltages, inductor currents, then per op-amp its
 * output current and its internal pole states (one per open-loop pole).
 */
import type { Design, OpAmpModel } from './types';
import { isGroundNode } from './types';

export const GROUND = -1;
export const INPUT = -2;

export interface OpAmpSlot {
  partIndex: number;
  id: string;
  plus: number;
  minus: number;
  out: number;
  /** Unknown: current the op-amp pushes into its output node. */
  outputCurrent: number;
  /** Unknown: first pole state (A0·Vd low-passed). */
  pole1: number;
  /** Unknown: second pole state, or -1 when the model has one pole. */
  pole2: number;
  model: OpAmpModel;
}

export interface DiodeSlot {
  partIndex: number;
  id: string;
  anode: number;
  cathode: number;
  /** Internal junction node between the series resistance and the junction; equals `anode` when RS = 0. */
  junction: number;
}

export interface CircuitLayout {
  size: number;
  /** Human name of each unknown, for error messages. */
  labels: string[];
  /** Unknown index of each node (GROUND / INPUT for the fixed ones). */
  nodeIndex: Map<string, number>;
  output: number;
  /** Per part: its node indices, in the part's node order. */
  partNodes: number[][];
  /** Per part: unknown of its branch current (inductors), else -1. */
  partBranch: Int32Array;
  opamps: OpAmpSlot[];
  diodes: DiodeSlot[];
}

export function buildLayout(design: Design): CircuitLayout {
  const labels: string[] = [];
  const nodeIndex = new Map<string, number>();
  const indexOf = (node: string): number => {
    if (isGroundNode(node)) return GROUND;
    if (node === design.input) return INPUT;
    let index = nodeIndex.get(node);
    if (index === undefined) {
      index = labels.length;
      nodeIndex.set(node, index);
      labels.push(`node ${node}`);
    }
    return index;
  };
  const partNodes = design.parts.map((part) => part.nodes.map(indexOf));
  const output = indexOf(design.output);
  nodeIndex.set(design.input, INPUT);

  const diodes: DiodeSlot[] = [];
  design.parts.forEach((part, partIndex) => {
    if (part.type !== 'diode') return;
    const [anode, cathode] = partNodes[partIndex];
    let junction = anode;
    if (part.model.rs > 0) {
      junction = labels.length;
      labels.push(`junction of ${part.id}`);
    }
    diodes.push({ partIndex, id: part.id, anode, cathode, junction });
  });

  const partBranch = new Int32Array(design.parts.length).fill(-1);
  design.parts.forEach((part, partIndex) => {
    if (part.type !== 'inductor') return;
    partBranch[partIndex] = labels.length;
    labels.push(`current of ${part.id}`);
  });

  const opamps: OpAmpSlot[] = [];
  design.parts.forEach((part, partIndex) => {
    if (part.type !== 'opamp') return;
    const [plus, minus, out] = partNodes[partIndex];
    const outputCurrent = labels.length;
    labels.push(`output of ${part.id}`);
    const pole1 = labels.length;
    labels.push(`open-loop pole of ${part.id}`);
    let pole2 = -1;
    if (part.model.secondPoleHz !== undefined) {
      pole2 = labels.length;
      labels.push(`second open-loop pole of ${part.id}`);
    }
    opamps.push({ partIndex, id: part.id, plus, minus, out, outputCurrent, pole1, pole2, model: part.model });
  });

  return { size: labels.length, labels, nodeIndex, output, partNodes, partBranch, opamps, diodes };
}
