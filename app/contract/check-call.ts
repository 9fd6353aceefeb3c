/**
 * The one boundary check for calls into the service from a window: the
 * Electron IPC handlers and the headless web host both pass every incoming
 * (method, args) through `validateCall` before anything reaches the service,
 * so a malformed call never touches the store or the instruments.
 *
 * The checks are the contract's own schemas (API_ARGUMENTS); this file only
 * walks the positional arguments and words the first problem as a
 * ValidationError naming the argument and field: `startRun(request).amplitude.vpp`.
 * Deep checks of a design's circuit (nodes, values) stay with the circuit
 * parser; here we check shape, types and ranges.
 */
import type * as v from 'valibot';
import { ValidationError } from '../errors';
import { API_ARGUMENTS, type ArgumentSpec, type RolloffApi, type RolloffMethodName } from './contract';
import { checkOrProblem } from './field-schemas';

/** Every method a window may call (one per method of the contract, see API_ARGUMENTS). */
export const API_METHOD_NAMES = Object.keys(API_ARGUMENTS) as readonly RolloffMethodName[];

function isApiMethodName(name: unknown): name is RolloffMethodName {
  return typeof name === 'string' && Object.prototype.hasOwnProperty.call(API_ARGUMENTS, name);
}

/**
 * Checks a call as it arrived (method name and argument list, both untrusted)
 * and returns the checked arguments for that method. Throws ValidationError
 * naming the argument and field that was wrong.
 */
export function validateCall(method: unknown, args: unknown): { method: RolloffMethodName; args: unknown[] } {
  if (!isApiMethodName(method)) {
    throw new ValidationError(
      'method',
      `"${String(method).slice(0, 80)}" is not a Rolloff API method`,
      `Known methods: ${API_METHOD_NAMES.join(', ')}.`,
    );
  }
  const list = args === undefined ? [] : args;
  if (!Array.isArray(list)) throw new ValidationError(`${method} arguments`, 'must be a JSON array of arguments', 'Send the arguments as a list, e.g. [] or [42].');
  return { method, args: checkArguments(method, API_ARGUMENTS[method], list) as unknown[] };
}

/** The checked arguments of one known method, typed as the contract declares them. */
export function checkArguments<M extends RolloffMethodName>(method: M, specs: readonly ArgumentSpec[], args: unknown[]): Parameters<RolloffApi[M]> {
  const checked: unknown[] = [];
  specs.forEach((spec, index) => {
    const where = `${method}(${spec.name}${index > 0 ? ` [argument ${index + 1}]` : ''})`;
    let value: unknown = args[index] === null ? undefined : args[index];
    if (value === undefined) {
      if (spec.presence === 'required') throw new ValidationError(where, 'is missing');
      if (spec.presence === 'optional') return;
      value = spec.presence.default;
    }
    checked.push(checkValue(spec.schema, value, where));
  });
  const extra = args.slice(checked.length).filter((value) => value !== undefined && value !== null);
  if (extra.length > 0) throw new ValidationError(method, `takes ${checked.length} argument(s) here but got ${args.length}`);
  return checked as Parameters<RolloffApi[M]>;
}

/**
 * Checks one value against a contract schema and returns the checked value,
 * or throws a ValidationError for the first problem, `where` followed by the
 * path of the field (`.amplitude.vpp`, `[2]`).
 */
export function checkValue<S extends v.GenericSchema>(schema: S, value: unknown, where: string): v.InferOutput<S> {
  const result = checkOrProblem(schema, value);
  if ('output' in result) return result.output;
  throw new ValidationError(where + result.problem.path, result.problem.message, result.problem.hint);
}
