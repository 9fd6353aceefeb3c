/**
 * Reads a design file (already JSON-parsed) into a Design, checking every
 * field once, here at the boundary. Every failure is a DesignError naming the
 * part or node and saying how to fix it.
 */
import { ValidationError } from '../errors';
import { parseEngineering } from '../units';
import { AcSolver } from './ac-solver';
import { DesignError } from './design-error';
import { checkTopology } from './topology';
import type { Design, DiodeModel, OpAmpModel, Part, PartType } from './types';
import { isGroundNode } from './types';

const PART_TYPES: readonly PartType[] = ['resistor', 'capacitor', 'inductor', 'diode', 'opamp'];
const NODE_COUNT: Record<PartType, number> = { resistor: 2, capacitor: 2, inductor: 2, diode: 2, opamp: 3 };
const NODE_ROLES: Record<PartType, string> = {
  resistor: '[a, b]',
  capacitor: '[a, b]',
  inductor: '[a, b]',
  diode: '[anode, cathode]',
  opamp: '[noninverting, inverting, output]',
};
/** SPICE default diode parameters (IS = 1e-14 A, N = 1, RS = 0) when a diode gives no model. */
const DEFAULT_DIODE: DiodeModel = { is: 1e-14, n: 1, rs: 0 };
const DEFAULT_TEMPERATURE_C = 25;

/** A frequency where the singularity check solves the circuit once (off any round number). */
const CHECK_FREQUENCY_HZ = 1234.567;

type Json = Record<string, unknown>;

function isObject(value: unknown): value is Json {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

export interface ParseDesignOptions {
  /**
   * Check the circuit as a whole (ground, floating nodes, op-amp feedback,
   * solvability). Default true; false reads and checks the fields only, e.g.
   * for an editor holding a half-drawn design.
   */
  checkCircuit?: boolean;
}

export function parseDesign(json: unknown, source = 'design', options: ParseDesignOptions = {}): Design {
  if (!isObject(json)) throw new DesignError(source, 'a design must be a JSON object', 'See the design-file example in app/circuit/examples/.');
  const name = json.name === undefined ? source : json.name;
  if (typeof name !== 'string' || name.trim() === '') throw new DesignError(`${source}: name`, 'must be a non-empty text');
  const input = nodeName(json.input, `${source}: input`);
  const output = nodeName(json.output, `${source}: output`);
  if (isGroundNode(input)) throw new DesignError(`${source}: input`, 'the input cannot be ground', 'Name the node the stimulus drives, e.g. "in".', { node: input });
  if (isGroundNode(output)) throw new DesignError(`${source}: output`, 'the output cannot be ground', 'Name the node you measure, e.g. "out".', { node: output });
  if (input === output) throw new DesignError(`${source}: output`, `the output is the input node "${input}"`, 'Measure a node the circuit drives.', { node: output });
  const temperatureC = json.temperatureC === undefined ? DEFAULT_TEMPERATURE_C : numberField(json.temperatureC, `${source}: temperatureC`);
  if (!(temperatureC > -273.15 && temperatureC < 1000)) throw new DesignError(`${source}: temperatureC`, `${temperatureC} °C is not a usable temperature`);
  if (!Array.isArray(json.parts) || json.parts.length === 0) {
    throw new DesignError(`${source}: parts`, 'must be a non-empty list of parts');
  }
  const seen = new Set<string>();
  const parts = json.parts.map((raw, index) => parsePart(raw, index, source, seen, input));
  const design: Design = { name, input, output, temperatureC, parts };
  if (typeof json.description === 'string') design.description = json.description;
  const mentioned = new Set(parts.flatMap((p) => p.nodes));
  if (!mentioned.has(input)) throw new DesignError(`${source}: input`, `input node "${input}" does not appear in any part`, 'Set "input" to a node that a part connects to.', { node: input });
  if (!mentioned.has(output)) throw new DesignError(`${source}: output`, `output node "${output}" does not appear in any part`, 'Set "output" to a node that a part connects to.', { node: output });
  if (options.checkCircuit === false) return design;
  checkTopology(design, source);
  checkSolvable(design);
  return design;
}

function nodeName(value: unknown, where: string): string {
  if (typeof value === 'number' && Number.isInteger(value) && value >= 0) return String(value);
  if (typeof value !== 'string' || value.trim() === '') throw new DesignError(where, 'must be a node name (text)');
  return value.trim();
}

function numberField(value: unknown, where: string): number {
  if (typeof value !== 'number' && typeof value !== 'string') throw new DesignError(where, 'must be a number or engineering notation such as 1k, 15n');
  try {
    return parseEngineering(value, where);
  } catch (error) {
    if (error instanceof ValidationError) throw new DesignError(where, error.message.slice(error.where.length + 2), error.hint);
    throw error;
  }
}

function positiveField(value: unknown, where: string, partId: string): number {
  const number = numberField(value, where);
  if (!(number > 0)) throw new DesignError(where, `must be greater than zero (got ${number})`, 'Use a positive value in SI units.', { partId });
  return number;
}

function parsePart(raw: unknown, index: number, source: string, seen: Set<string>, input: string): Part {
  const at = `${source}: parts[${index}]`;
  if (!isObject(raw)) throw new DesignError(at, 'must be an object with id, type and nodes');
  if (typeof raw.id !== 'string' || raw.id.trim() === '') throw new DesignError(`${at}.id`, 'must be a non-empty text such as "R1"');
  const id = raw.id.trim();
  const where = `${source}: part ${id}`;
  if (seen.has(id)) throw new DesignError(where, `duplicate id "${id}"`, 'Give every part its own id.', { partId: id });
  seen.add(id);
  const type = raw.type;
  if (typeof type !== 'string' || !PART_TYPES.includes(type as PartType)) {
    throw new DesignError(`${where}.type`, `unknown part type ${JSON.stringify(type)}`, `Use one of: ${PART_TYPES.join(', ')}.`, { partId: id });
  }
  const partType = type as PartType;
  const count = NODE_COUNT[partType];
  if (!Array.isArray(raw.nodes) || raw.nodes.length !== count) {
    throw new DesignError(`${where}.nodes`, `a ${partType} needs ${count} nodes ${NODE_ROLES[partType]}`, undefined, { partId: id });
  }
  const nodes = raw.nodes.map((node, k) => nodeName(node, `${where}.nodes[${k}]`));

  switch (partType) {
    case 'resistor':
    case 'capacitor':
    case 'inductor': {
      if (nodes[0] === nodes[1] || (isGroundNode(nodes[0]) && isGroundNode(nodes[1]))) {
        throw new DesignError(`${where}.nodes`, `both ends are on node "${nodes[0]}"`, 'A part shorted onto itself does nothing; check the node names.', { partId: id });
      }
      if (raw.value === undefined) throw new DesignError(`${where}.value`, 'is missing', 'Give the value in SI units, e.g. "1k" or 1000.', { partId: id });
      const value = positiveField(raw.value, `${where}.value`, id);
      const part: Part = { id, type: partType, nodes: [nodes[0], nodes[1]], value };
      if (raw.tolerance !== undefined) part.tolerance = toleranceField(raw.tolerance, `${where}.tolerance`, id);
      return part;
    }
    case 'diode': {
      if (nodes[0] === nodes[1]) throw new DesignError(`${where}.nodes`, `both ends are on node "${nodes[0]}"`, undefined, { partId: id });
      return { id, type: 'diode', nodes: [nodes[0], nodes[1]], model: diodeModel(raw.model, `${where}.model`, id) };
    }
    case 'opamp': {
      const [plus, minus, out] = nodes;
      if (isGroundNode(out)) throw new DesignError(`${where}.nodes[2]`, 'the op-amp output cannot be ground', undefined, { partId: id });
      if (out === input) throw new DesignError(`${where}.nodes[2]`, `the op-amp output is the driven input node "${input}"`, 'Two sources cannot drive one node; give the output its own node.', { partId: id });
      if (plus === minus || (isGroundNode(plus) && isGroundNode(minus))) {
        throw new DesignError(`${where}.nodes`, 'both op-amp inputs are on the same node', undefined, { partId: id });
      }
      return { id, type: 'opamp', nodes: [plus, minus, out], model: opAmpModel(raw.model, `${where}.model`, id) };
    }
  }
}

function toleranceField(value: unknown, where: string, partId: string): number {
  let tolerance: number;
  if (typeof value === 'string' && value.trim().endsWith('%')) tolerance = numberField(value.trim().slice(0, -1), where) / 100;
  else tolerance = numberField(value, where);
  if (!(tolerance >= 0 && tolerance < 1)) {
    throw new DesignError(where, `${tolerance} is not a relative tolerance`, 'Write it as a fraction (0.01 for ±1 %) or as "1%".', { partId });
  }
  return tolerance;
}

function diodeModel(raw: unknown, where: string, partId: string): DiodeModel {
  if (raw === undefined) return { ...DEFAULT_DIODE };
  if (!isObject(raw)) throw new DesignError(where, 'must be an object { is, n, rs }', undefined, { partId });
  return {
    is: raw.is === undefined ? DEFAULT_DIODE.is : positiveField(raw.is, `${where}.is`, partId),
    n: raw.n === undefined ? DEFAULT_DIODE.n : positiveField(raw.n, `${where}.n`, partId),
    rs: raw.rs === undefined ? DEFAULT_DIODE.rs : nonNegative(raw.rs, `${where}.rs`, partId),
  };
}

function nonNegative(value: unknown, where: string, partId: string): number {
  const number = numberField(value, where);
  if (!(number >= 0)) throw new DesignError(where, `must not be negative (got ${number})`, undefined, { partId });
  return number;
}

function opAmpModel(raw: unknown, where: string, partId: string): OpAmpModel {
  if (!isObject(raw)) {
    throw new DesignError(where, 'is missing', 'Give at least { "openLoopGain": 1e5, "gbw": 1e6 } or { "ideal": true }.', { partId });
  }
  if (raw.ideal !== undefined && typeof raw.ideal !== 'boolean') throw new DesignError(`${where}.ideal`, 'must be true or false', undefined, { partId });
  const ideal = raw.ideal === true;
  // An ideal op-amp still carries nominal gain figures so every formula stays finite.
  const model: OpAmpModel = {
    openLoopGain: raw.openLoopGain === undefined && ideal ? 1e12 : positiveField(raw.openLoopGain, `${where}.openLoopGain`, partId),
    gbw: raw.gbw === undefined && ideal ? 1e15 : positiveField(raw.gbw, `${where}.gbw`, partId),
  };
  if (raw.slewRate !== undefined) model.slewRate = positiveField(raw.slewRate, `${where}.slewRate`, partId);
  if (raw.rails !== undefined) {
    if (!Array.isArray(raw.rails) || raw.rails.length !== 2) throw new DesignError(`${where}.rails`, 'must be [low, high] in volts', undefined, { partId });
    const low = numberField(raw.rails[0], `${where}.rails[0]`);
    const high = numberField(raw.rails[1], `${where}.rails[1]`);
    if (!(low < 0 && high > 0)) throw new DesignError(`${where}.rails`, `[${low}, ${high}] must straddle 0 V (low < 0 < high)`, 'Give the output swing limits, e.g. [-12, 12].', { partId });
    model.rails = [low, high];
  }
  if (raw.secondPoleHz !== undefined) model.secondPoleHz = positiveField(raw.secondPoleHz, `${where}.secondPoleHz`, partId);
  if (raw.inputOffsetV !== undefined) model.inputOffsetV = numberField(raw.inputOffsetV, `${where}.inputOffsetV`);
  if (raw.inputBiasA !== undefined) model.inputBiasA = numberField(raw.inputBiasA, `${where}.inputBiasA`);
  // Noise densities and corners: zero is allowed (and is what an absent field means).
  for (const field of ['outputResistanceOhm', 'voltageNoiseVPerRtHz', 'voltageNoiseCornerHz', 'currentNoiseAPerRtHz', 'currentNoiseCornerHz'] as const) {
    if (raw[field] !== undefined) model[field] = nonNegative(raw[field], `${where}.${field}`, partId);
  }
  if (ideal) model.ideal = true;
  return model;
}

/** One trial solve, with the op-amp model and with ideal op-amps, to catch singular circuits early. */
function checkSolvable(design: Design): void {
  const solver = new AcSolver(design);
  const h = new Float64Array(2);
  solver.stamp('model');
  solver.transferAt(CHECK_FREQUENCY_HZ, h);
  solver.stamp('ideal');
  solver.transferAt(CHECK_FREQUENCY_HZ, h);
}
