/**
 * Reads a design file (already JSON-parsed) into a Design, checking every
 * field once, here at the boundary. Every failure is a DesignError naming the
 * part or node and saying how to fix it.
 */
import { checkOrProblem } from '../contract/field-schemas';
import { AcSolver } from './ac-solver';
import { DesignError } from './design-error';
import { DesignFileSchema, type Design } from './design-schema';
import { checkTopology } from './topology';

/** A frequency where the singularity check solves the circuit once (off any round number). */
const CHECK_FREQUENCY_HZ = 1234.567;

export interface ParseDesignOptions {
  /**
   * Check the circuit as a whole (ground, floating nodes, op-amp feedback,
   * solvability). Default true; false reads and checks the fields only, e.g.
   * for an editor holding a half-drawn design.
   */
  checkCircuit?: boolean;
}

/**
 * The fields by the schema (design-schema.ts: shapes, defaults, node counts,
 * shorted parts, the input and output nodes); then, as code, what needs the
 * circuit as a whole: ground and floating nodes, op-amp feedback
 * (topology.ts), and a trial solve.
 */
export function parseDesign(json: unknown, source = 'design', options: ParseDesignOptions = {}): Design {
  const result = checkOrProblem(DesignFileSchema, json);
  if ('problem' in result) throw designError(json, source, result.problem);
  const { name, ...rest } = result.output;
  const design: Design = { name: name ?? source, ...rest };
  if (options.checkCircuit === false) return design;
  checkTopology(design, source);
  checkSolvable(design);
  return design;
}

/**
 * The schema's first problem as a DesignError: a part is named by its id
 * ("part R1.value") once it has a usable one, else by its place ("parts[2]");
 * the part or the input/output node is carried for the editor to point at.
 */
function designError(json: unknown, source: string, problem: { path: string; message: string; hint?: string }): DesignError {
  const part = /^\.parts\[(\d+)\](.*)$/.exec(problem.path);
  if (part) {
    const raw = (json as { parts: unknown[] }).parts[Number(part[1])] as { id?: unknown } | undefined;
    const id = typeof raw?.id === 'string' && raw.id.trim() !== '' ? raw.id.trim() : undefined;
    if (id !== undefined && part[2] !== '.id') return new DesignError(`${source}: part ${id}${part[2]}`, problem.message, problem.hint, { partId: id });
    return new DesignError(`${source}: parts[${part[1]}]${part[2]}`, problem.message, problem.hint);
  }
  const terminal = /^\.(input|output)$/.exec(problem.path);
  const node = terminal ? (json as Record<string, unknown>)[terminal[1]] : undefined;
  const subject = typeof node === 'string' || typeof node === 'number' ? { node: String(node).trim() } : undefined;
  return new DesignError(problem.path === '' ? source : `${source}: ${problem.path.slice(1)}`, problem.message, problem.hint, subject);
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
