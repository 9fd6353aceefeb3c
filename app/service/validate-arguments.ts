/**
 * The one boundary check for calls into the service from a window: the
 * Electron IPC handlers and the headless web host both pass every incoming
 * (method, args) through `validateCall` before anything reaches the service,
 * so a malformed call never touches the store or the instruments.
 *
 * Pure: imports only app/errors and the contract types, so it can be tested
 * anywhere. Deep checks of a design's circuit (nodes, values) stay with the
 * circuit parser; here we check shape, types and ranges.
 */
import { ValidationError } from '../errors';
import { INSTRUMENT_ROLES as ROLES, RECORD_FORMATS } from '../contract/contract';
import type {
  ConnectRequest,
  InstrumentRole,
  RecordFormat,
  RolloffApi,
  RolloffMethodName,
  RunStatus,
  ServiceEventName,
  SweepRequest,
  VerdictLimits,
} from '../contract/contract';

/** Every event the service pushes to windows. */
export const SERVICE_EVENT_NAMES: readonly ServiceEventName[] = ['progress', 'point', 'runEvent', 'traffic', 'bench'];

const RUN_STATUSES: readonly RunStatus[] = ['planned', 'running', 'paused', 'done', 'stopped', 'failed'];

/** Sizes beyond any real use; they keep a hostile caller from making the service work hard. */
const MAX_TEXT_CHARS = 20_000;
const MAX_SHORT_TEXT_CHARS = 500;
const MAX_RUNS_PER_CALL = 200;
const MAX_POINTS_PER_DECADE = 1_000;
const MAX_DESIGN_JSON_CHARS = 1_000_000;
const MAX_COUNT = 10_000;

type ApiArguments<M extends RolloffMethodName> = Parameters<RolloffApi[M]>;

function isApiMethodName(name: unknown): name is RolloffMethodName {
  return typeof name === 'string' && Object.prototype.hasOwnProperty.call(CHECKS, name);
}

/**
 * Checks a call as it arrived (method name and argument list, both untrusted)
 * and returns the arguments typed for that method. Throws ValidationError
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
  return { method, args: validateArguments(method, list) };
}

/** Validates the argument list of one known method. */
function validateArguments<M extends RolloffMethodName>(method: M, args: unknown[]): ApiArguments<M> {
  const check = CHECKS[method];
  return check(new ArgumentReader(method, args)) as ApiArguments<M>;
}

type Check = (reader: ArgumentReader) => unknown[];

const CHECKS: Record<RolloffMethodName, Check> = {
  listPorts: (r) => r.done([]),
  listProfiles: (r) => r.done([]),
  benchStatus: (r) => r.done([]),
  connect: (r) => r.done([connectRequest(r.required(0, 'request'), r.where(0, 'request'))]),
  disconnect: (r) => r.done([oneOf(r.required(0, 'role'), ROLES, r.where(0, 'role'))]),
  startSimulatedBench: (r) => r.done([storeId(r.required(0, 'designId'), r.where(0, 'designId'))]),
  setMaxStimulus: (r) => r.done([positiveNumber(r.required(0, 'maxStimulusVpp'), r.where(0, 'maxStimulusVpp'), 'V peak-to-peak')]),
  listTemplates: (r) => r.done([]),
  makeTemplate: (r) =>
    r.done([
      shortText(r.required(0, 'templateId'), r.where(0, 'templateId'), false),
      numberRecord(r.optional(1) ?? {}, r.where(1, 'parameters'), 'finite'),
    ]),
  saveDesign: (r) => r.done([designObject(r.required(0, 'design'), r.where(0, 'design'))]),
  listDesigns: (r) => r.done([]),
  createBuild: (r) => r.done([buildRequest(r.required(0, 'build'), r.where(0, 'build'))]),
  listBuilds: (r) => {
    const designId = r.optional(0);
    return r.done(designId === undefined ? [] : [storeId(designId, r.where(0, 'designId'))]);
  },
  planSweep: (r) => r.done([sweepRequest(r.required(0, 'request'), r.where(0, 'request'))]),
  startRun: (r) => r.done([sweepRequest(r.required(0, 'request'), r.where(0, 'request'))]),
  pauseRun: (r) => r.done([storeId(r.required(0, 'runId'), r.where(0, 'runId'))]),
  resumeRun: (r) => r.done([storeId(r.required(0, 'runId'), r.where(0, 'runId'))]),
  stopRun: (r) => r.done([storeId(r.required(0, 'runId'), r.where(0, 'runId'))]),
  listRuns: (r) => {
    const filter = r.optional(0);
    return r.done(filter === undefined ? [] : [runFilter(filter, r.where(0, 'filter'))]);
  },
  getRun: (r) => r.done([storeId(r.required(0, 'runId'), r.where(0, 'runId'))]),
  compareRuns: (r) => {
    const reference = r.required(1, 'reference');
    const where = r.where(1, 'reference');
    return r.done([runIdList(r.required(0, 'runIds'), r.where(0, 'runIds')), reference === 'theory' ? 'theory' : storeId(reference, where)]);
  },
  exportRecord: (r) =>
    r.done([runIdList(r.required(0, 'runIds'), r.where(0, 'runIds')), oneOf(r.required(1, 'format'), RECORD_FORMATS, r.where(1, 'format'))]),
};

/**
 * Every method a window may call. Taken from the checks table, whose type
 * requires one entry per contract method, so a method added to the contract
 * cannot be called before its arguments are checked here.
 */
export const API_METHOD_NAMES = Object.keys(CHECKS) as readonly RolloffMethodName[];

/** Walks one call's positional arguments and refuses extra ones. */
class ArgumentReader {
  constructor(
    readonly method: string,
    readonly args: unknown[],
  ) {}

  where(index: number, name: string): string {
    return `${this.method}(${name}${index > 0 ? ` [argument ${index + 1}]` : ''})`;
  }

  required(index: number, name: string): unknown {
    const value = this.args[index];
    if (value === undefined || value === null) throw new ValidationError(this.where(index, name), 'is missing');
    return value;
  }

  optional(index: number): unknown {
    const value = this.args[index];
    return value === null ? undefined : value;
  }

  done(checked: unknown[]): unknown[] {
    const extra = this.args.slice(checked.length).filter((value) => value !== undefined && value !== null);
    if (this.args.length > checked.length && extra.length > 0) {
      throw new ValidationError(`${this.method}`, `takes ${checked.length} argument(s) here but got ${this.args.length}`);
    }
    return checked;
  }
}

function describe(value: unknown): string {
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'a list';
  if (typeof value === 'string') return `"${value.slice(0, 40)}${value.length > 40 ? '…' : ''}"`;
  if (typeof value === 'object') return 'an object';
  return String(value);
}

function plainObject(value: unknown, where: string): Record<string, unknown> {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) {
    throw new ValidationError(where, `must be an object, got ${describe(value)}`);
  }
  return value as Record<string, unknown>;
}

function onlyKeys(object: Record<string, unknown>, allowed: readonly string[], where: string): void {
  for (const key of Object.keys(object)) {
    if (!allowed.includes(key)) {
      throw new ValidationError(`${where}.${key.slice(0, 60)}`, 'is not a known field', `Known fields: ${allowed.join(', ')}.`);
    }
  }
}

function finiteNumber(value: unknown, where: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) throw new ValidationError(where, `must be a finite number, got ${describe(value)}`);
  return value;
}

function positiveNumber(value: unknown, where: string, unit: string): number {
  const number = finiteNumber(value, where);
  if (number <= 0) throw new ValidationError(where, `must be greater than zero (${unit}), got ${number}`);
  return number;
}

function integerInRange(value: unknown, where: string, low: number, high: number): number {
  const number = finiteNumber(value, where);
  if (!Number.isInteger(number) || number < low || number > high) {
    throw new ValidationError(where, `must be a whole number from ${low} to ${high}, got ${number}`);
  }
  return number;
}

/** Store ids are SQLite rowids: positive integers. */
function storeId(value: unknown, where: string): number {
  const number = finiteNumber(value, where);
  if (!Number.isSafeInteger(number) || number < 1) throw new ValidationError(where, `must be a positive whole number (a store id), got ${number}`);
  return number;
}

function oneOf<T extends string>(value: unknown, allowed: readonly T[], where: string): T {
  if (typeof value !== 'string' || !(allowed as readonly string[]).includes(value)) {
    throw new ValidationError(where, `must be one of ${allowed.join(', ')}, got ${describe(value)}`);
  }
  return value as T;
}

function text(value: unknown, where: string, maxChars: number, allowEmpty: boolean): string {
  if (typeof value !== 'string') throw new ValidationError(where, `must be text, got ${describe(value)}`);
  if (!allowEmpty && value.trim() === '') throw new ValidationError(where, 'must not be empty');
  if (value.length > maxChars) throw new ValidationError(where, `is ${value.length} characters long; at most ${maxChars} are accepted`);
  return value;
}

function shortText(value: unknown, where: string, allowEmpty: boolean): string {
  return text(value, where, MAX_SHORT_TEXT_CHARS, allowEmpty);
}

function boolean(value: unknown, where: string): boolean {
  if (typeof value !== 'boolean') throw new ValidationError(where, `must be true or false, got ${describe(value)}`);
  return value;
}

function numberRecord(value: unknown, where: string, kind: 'finite' | 'positive'): Record<string, number> {
  const object = plainObject(value, where);
  const entries = Object.entries(object);
  if (entries.length > MAX_COUNT) throw new ValidationError(where, `has ${entries.length} entries; at most ${MAX_COUNT} are accepted`);
  const result: Record<string, number> = {};
  for (const [key, entry] of entries) {
    const entryWhere = `${where}.${key.slice(0, 60)}`;
    shortText(key, `${where} key`, false);
    result[key] = kind === 'positive' ? positiveNumber(entry, entryWhere, 'SI units') : finiteNumber(entry, entryWhere);
  }
  return result;
}

function runIdList(value: unknown, where: string): number[] {
  if (!Array.isArray(value)) throw new ValidationError(where, `must be a list of run ids, got ${describe(value)}`);
  if (value.length === 0) throw new ValidationError(where, 'must name at least one run', 'Pick one or more runs first.');
  if (value.length > MAX_RUNS_PER_CALL) throw new ValidationError(where, `names ${value.length} runs; at most ${MAX_RUNS_PER_CALL} are accepted`);
  const ids = value.map((id, index) => storeId(id, `${where}[${index}]`));
  if (new Set(ids).size !== ids.length) throw new ValidationError(where, 'names the same run more than once');
  return ids;
}

function connectRequest(value: unknown, where: string): ConnectRequest {
  const object = plainObject(value, where);
  onlyKeys(object, ['role', 'address', 'profileId'], where);
  return {
    role: oneOf(object.role, ROLES, `${where}.role`),
    address: shortText(object.address, `${where}.address`, false).trim(),
    profileId: shortText(object.profileId, `${where}.profileId`, false),
  };
}

function designObject(value: unknown, where: string): unknown {
  const object = plainObject(value, where);
  if (!Array.isArray(object.parts)) throw new ValidationError(`${where}.parts`, 'must be a list of parts', 'A design file lists its parts by nodes; see the templates for examples.');
  const size = JSON.stringify(object).length;
  if (size > MAX_DESIGN_JSON_CHARS) throw new ValidationError(where, `is ${size} characters of JSON; at most ${MAX_DESIGN_JSON_CHARS} are accepted`);
  return object;
}

function buildRequest(value: unknown, where: string): Parameters<RolloffApi['createBuild']>[0] {
  const object = plainObject(value, where);
  onlyKeys(object, ['designId', 'label', 'notes', 'actualValues'], where);
  return {
    designId: storeId(object.designId, `${where}.designId`),
    label: shortText(object.label, `${where}.label`, false).trim(),
    notes: text(object.notes ?? '', `${where}.notes`, MAX_TEXT_CHARS, true),
    actualValues: numberRecord(object.actualValues ?? {}, `${where}.actualValues`, 'positive'),
  };
}

function runFilter(value: unknown, where: string): { search?: string; status?: RunStatus; buildId?: number } {
  const object = plainObject(value, where);
  onlyKeys(object, ['search', 'status', 'buildId'], where);
  const filter: { search?: string; status?: RunStatus; buildId?: number } = {};
  if (object.search !== undefined && object.search !== null) filter.search = shortText(object.search, `${where}.search`, true);
  if (object.status !== undefined && object.status !== null) filter.status = oneOf(object.status, RUN_STATUSES, `${where}.status`);
  if (object.buildId !== undefined && object.buildId !== null) filter.buildId = storeId(object.buildId, `${where}.buildId`);
  return filter;
}

const SWEEP_FIELDS = [
  'buildId', 'kind', 'from', 'to', 'pointsPerDecade', 'spacing', 'amplitude', 'measurement',
  'minCycles', 'averages', 'refine', 'operator', 'notes', 'limits', 'through', 'maxStimulusVpp',
] as const;

function sweepRequest(value: unknown, where: string): SweepRequest {
  const object = plainObject(value, where);
  onlyKeys(object, SWEEP_FIELDS, where);
  const kind = oneOf(object.kind, ['ac', 'dc'] as const, `${where}.kind`);
  const from = finiteNumber(object.from, `${where}.from`);
  const to = finiteNumber(object.to, `${where}.to`);
  if (kind === 'ac') {
    if (from <= 0) throw new ValidationError(`${where}.from`, `must be a frequency above 0 Hz, got ${from}`);
    if (to <= from) throw new ValidationError(`${where}.to`, `must be above the start frequency (${from} Hz), got ${to}`, 'Sweeps run from low to high frequency.');
  } else if (from === to) {
    throw new ValidationError(`${where}.to`, 'must differ from the start level', 'A DC transfer sweep needs a range of input levels.');
  }
  const spacing = oneOf(object.spacing, ['log', 'linear'] as const, `${where}.spacing`);
  if (kind === 'dc' && spacing === 'log' && (from <= 0 || to <= 0)) {
    throw new ValidationError(`${where}.from`, 'log-spaced input levels must be above 0 V', 'Use linear spacing for ranges that cross zero.');
  }
  const request: SweepRequest = {
    buildId: storeId(object.buildId, `${where}.buildId`),
    kind,
    from,
    to,
    pointsPerDecade: integerInRange(object.pointsPerDecade, `${where}.pointsPerDecade`, 1, MAX_POINTS_PER_DECADE),
    spacing,
    amplitude: amplitude(object.amplitude, `${where}.amplitude`),
    measurement: oneOf(object.measurement, ['scope', 'meter'] as const, `${where}.measurement`),
    minCycles: integerInRange(object.minCycles, `${where}.minCycles`, 1, MAX_COUNT),
    averages: integerInRange(object.averages, `${where}.averages`, 1, MAX_COUNT),
    refine: boolean(object.refine, `${where}.refine`),
    operator: shortText(object.operator ?? '', `${where}.operator`, true),
    notes: text(object.notes ?? '', `${where}.notes`, MAX_TEXT_CHARS, true),
  };
  if (object.limits !== undefined && object.limits !== null) request.limits = verdictLimits(object.limits, `${where}.limits`);
  if (object.through !== undefined && object.through !== null) request.through = boolean(object.through, `${where}.through`);
  if (object.maxStimulusVpp !== undefined && object.maxStimulusVpp !== null) {
    // The ceiling is the bench's setting, recorded by the service; a window may not pass its own.
    throw new ValidationError(`${where}.maxStimulusVpp`, 'is set by the service from the bench setting, not by the caller', 'Set the maximum stimulus on the Bench view (setMaxStimulus).');
  }
  return request;
}

function amplitude(value: unknown, where: string): SweepRequest['amplitude'] {
  const object = plainObject(value, where);
  const mode = oneOf(object.mode, ['fixed', 'auto'] as const, `${where}.mode`);
  if (mode === 'fixed') {
    onlyKeys(object, ['mode', 'vpp'], where);
    return { mode, vpp: positiveNumber(object.vpp, `${where}.vpp`, 'V peak-to-peak') };
  }
  onlyKeys(object, ['mode', 'targetOutputVpp'], where);
  if (object.targetOutputVpp === undefined || object.targetOutputVpp === null) return { mode };
  return { mode, targetOutputVpp: positiveNumber(object.targetOutputVpp, `${where}.targetOutputVpp`, 'V peak-to-peak') };
}

function verdictLimits(value: unknown, where: string): VerdictLimits {
  const object = plainObject(value, where);
  onlyKeys(object, ['maxDeviationDb', 'cornerTolerance', 'passbandGainDb'], where);
  const limits: VerdictLimits = {};
  if (object.maxDeviationDb !== undefined && object.maxDeviationDb !== null) limits.maxDeviationDb = positiveNumber(object.maxDeviationDb, `${where}.maxDeviationDb`, 'dB');
  if (object.cornerTolerance !== undefined && object.cornerTolerance !== null) limits.cornerTolerance = positiveNumber(object.cornerTolerance, `${where}.cornerTolerance`, 'relative');
  if (object.passbandGainDb !== undefined && object.passbandGainDb !== null) {
    const window = object.passbandGainDb;
    if (!Array.isArray(window) || window.length !== 2) throw new ValidationError(`${where}.passbandGainDb`, 'must be [lowDb, highDb]');
    const low = finiteNumber(window[0], `${where}.passbandGainDb[0]`);
    const high = finiteNumber(window[1], `${where}.passbandGainDb[1]`);
    if (high < low) throw new ValidationError(`${where}.passbandGainDb`, `low limit ${low} dB is above high limit ${high} dB`);
    limits.passbandGainDb = [low, high];
  }
  return limits;
}
