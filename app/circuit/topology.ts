/**
 * Structural checks that need the whole circuit: ground present, every node
 * tied into the circuit, every op-amp closing a feedback path.
 */
import { DesignError } from './design-error';
import type { Design } from './types';
import { isGroundNode } from './types';

const GROUND_KEY = '0';

function key(node: string): string {
  return isGroundNode(node) ? GROUND_KEY : node;
}

export function checkTopology(design: Design, source: string): void {
  const hasOpAmp = design.parts.some((p) => p.type === 'opamp');
  const touchesGround = design.parts.some((p) => p.nodes.some(isGroundNode));
  if (!touchesGround && !hasOpAmp) {
    throw new DesignError(source, 'no part connects to ground', 'Connect the reference side of the circuit to node "0" (or "gnd").');
  }

  // Terminal count per node; the stimulus source adds one at the input node.
  const terminals = new Map<string, string[]>();
  const note = (node: string, partId: string) => {
    const list = terminals.get(key(node)) ?? [];
    list.push(partId);
    terminals.set(key(node), list);
  };
  note(design.input, 'the input source');
  for (const part of design.parts) for (const node of part.nodes) note(node, part.id);
  if (!terminals.has(key(design.output)) || terminals.get(key(design.output))!.length === 0) {
    throw new DesignError(`${source}: output`, `output node "${design.output}" is not connected to any part`, 'Set "output" to a node that appears in some part\'s "nodes".', { node: design.output });
  }
  if (terminals.get(key(design.input))!.length < 2) {
    throw new DesignError(`${source}: input`, `input node "${design.input}" is not connected to any part`, 'Set "input" to a node that appears in some part\'s "nodes".', { node: design.input });
  }
  for (const [node, ids] of terminals) {
    if (node === GROUND_KEY || node === design.output || node === design.input) continue;
    if (ids.length < 2) {
      throw new DesignError(
        `${source}: node ${node}`,
        `node "${node}" connects only to ${ids[0]}, so it is floating`,
        'Check the node names of that part for a typo, or connect the node to the rest of the circuit.',
        { node, partId: ids[0] },
      );
    }
  }

  // Connectivity: parts join their nodes; sources (input, op-amp outputs) join their node to ground.
  const parent = new Map<string, string>();
  const find = (node: string): string => {
    let root = key(node);
    while (parent.has(root) && parent.get(root) !== root) root = parent.get(root)!;
    return root;
  };
  const join = (a: string, b: string) => {
    const ra = find(a);
    const rb = find(b);
    if (ra !== rb) parent.set(ra, rb);
  };
  join(design.input, GROUND_KEY);
  for (const part of design.parts) {
    if (part.type === 'opamp') join(part.nodes[2], GROUND_KEY);
    else join(part.nodes[0], part.nodes[1]);
  }
  for (const node of terminals.keys()) {
    if (find(node) !== find(GROUND_KEY)) {
      throw new DesignError(
        `${source}: node ${node}`,
        `node "${node}" has no connection to the rest of the circuit (it is floating)`,
        'An op-amp input alone does not tie a node down; connect it through a part to the input, the output or ground.',
        { node },
      );
    }
  }

  for (const part of design.parts) {
    if (part.type !== 'opamp') continue;
    if (!hasFeedbackPath(design, part.nodes[2], part.nodes[1])) {
      throw new DesignError(
        `${source}: part ${part.id}`,
        `op-amp ${part.id} has no feedback path from its output "${part.nodes[2]}" to its inverting input "${part.nodes[1]}"`,
        'Connect a part (or a wire, by naming the same node) from the output back to the inverting input.',
        { partId: part.id },
      );
    }
  }
}

/**
 * Is `to` reachable from `from` through parts (or through other op-amps, input
 * to output) without passing through ground or the driven input node? Those
 * are fixed voltages, so a path through them carries no feedback.
 */
function hasFeedbackPath(design: Design, from: string, to: string): boolean {
  const target = key(to);
  const start = key(from);
  if (start === target) return true;
  const neighbours = new Map<string, Set<string>>();
  const link = (a: string, b: string, both: boolean) => {
    const ka = key(a);
    const kb = key(b);
    if (!neighbours.has(ka)) neighbours.set(ka, new Set());
    neighbours.get(ka)!.add(kb);
    if (both) {
      if (!neighbours.has(kb)) neighbours.set(kb, new Set());
      neighbours.get(kb)!.add(ka);
    }
  };
  for (const part of design.parts) {
    if (part.type === 'opamp') {
      link(part.nodes[0], part.nodes[2], false);
      link(part.nodes[1], part.nodes[2], false);
    } else link(part.nodes[0], part.nodes[1], true);
  }
  const seen = new Set([start]);
  const queue = [start];
  while (queue.length > 0) {
    const node = queue.shift()!;
    for (const next of neighbours.get(node) ?? []) {
      if (next === target) return true;
      if (seen.has(next) || next === GROUND_KEY || next === design.input) continue;
      seen.add(next);
      queue.push(next);
    }
  }
  return false;
}
