/**
 * Profiles: the SCPI command templates for one instrument role, kept as JSON
 * data a user can write from their instrument's programming manual. Validated
 * once when loaded; every problem names the file and the field.
 */
import { INSTRUMENT_ROLES, type InstrumentRole } from '../contract/contract';
import { ProfileError } from './errors';
import type { GeneratorLimits } from './roles';
import { isQuery, templatePlaceholders } from './template';

/** How an operation's command list must look. */
interface OperationRule {
  placeholders: readonly string[];
  required: boolean;
  /** Last command must be a query (and only the last): its reply is the operation's result. */
  query: boolean;
  description: string;
}

const op = (description: string, placeholders: string[] = [], query = false, required = true): OperationRule => ({ description, placeholders, query, required });

/** Every operation each role knows, with the placeholders its templates may use. */
export const OPERATION_RULES: Record<InstrumentRole, Record<string, OperationRule>> = {
  generator: {
    sineFunction: op('select sine output'),
    dcFunction: op('select DC output'),
    frequency: op('set frequency', ['frequencyHz']),
    amplitude: op('set amplitude in the profile\'s amplitudeUnit', ['amplitude']),
    offset: op('set DC offset (also the DC level)', ['offsetV']),
    outputOn: op('output on'),
    outputOff: op('output off'),
    loadHighZ: op('amplitude calibrated for a high-impedance load'),
    load50Ohm: op('amplitude calibrated for a 50 Ω load'),
    readFrequency: op('read the frequency back', [], true),
  },
  meter: {
    readAcRms: op('read AC RMS volts', [], true),
    readDc: op('read DC volts', [], true),
    acRange: op('AC range in volts', ['rangeV']),
    dcRange: op('DC range in volts', ['rangeV']),
    acRangeAuto: op('AC autorange'),
    dcRangeAuto: op('DC autorange'),
    integration: op('integration time', ['integrationS', 'powerLineCycles']),
  },
  scope: {
    channelOn: op('turn a channel on', ['channel']),
    verticalScale: op('volts per division', ['channel', 'voltsPerDiv']),
    timebase: op('horizontal scale', ['secondsPerDiv', 'secondsPerRecord']),
    acquire: op('capture one record of both channels and wait for it', [], true),
    waveformPreamble: op('waveform scaling of a channel', ['channel'], true),
    waveformData: op('waveform data block of a channel', ['channel'], true),
    // One program message, one response message: channel 1 preamble; channel 1 data; channel 2 preamble; channel 2 data.
    waveformBoth: op('preamble and data of channel 1, then of channel 2, in one response message', [], true, false),
    measureAmplitudeVpp: op('peak-to-peak of a channel', ['channel'], true, false),
    measurePhaseDeg: op('phase of channel 2 relative to channel 1', [], true, false),
  },
};

export type WaveformEncoding = 'int8' | 'int16-le' | 'int16-be' | 'float32-le' | 'float32-be';
export const WAVEFORM_ENCODINGS: readonly WaveformEncoding[] = ['int8', 'int16-le', 'int16-be', 'float32-le', 'float32-be'];

/** Names a preamble field may take; volts = (code − codeOffset) · voltsPerCode + voltsOffset. */
export const PREAMBLE_FIELDS = ['points', 'sampleIntervalS', 'xOriginS', 'voltsPerCode', 'codeOffset', 'voltsOffset', 'ignore'] as const;
export type PreambleField = (typeof PREAMBLE_FIELDS)[number];

interface ProfileCommon {
  id: string;
  description: string;
  /** Sent once after connecting (e.g. *CLS, data format). */
  init: string[];
  /** Read the error queue after each batch of settings (see operation.ts) and fail on the first error. */
  checkErrors: boolean;
  timeoutS: number;
  /** Operation name → commands, in order. */
  operations: Record<string, string[]>;
  /** File it came from ("built-in: NAME.json" for shipped ones). */
  source: string;
  builtIn: boolean;
}

export interface GeneratorProfile extends ProfileCommon {
  role: 'generator';
  generator: { limits: GeneratorLimits; amplitudeUnit: 'Vpp' | 'Vrms'; sourceImpedanceOhm: number };
}

export interface MeterProfile extends ProfileCommon {
  role: 'meter';
  meter: { powerLineHz: number };
}

export interface ScopeProfile extends ProfileCommon {
  role: 'scope';
  scope: { divisions: number; encoding: WaveformEncoding; preambleFields: PreambleField[] };
}

export type Profile = GeneratorProfile | MeterProfile | ScopeProfile;
export type ProfileFor<R extends InstrumentRole> = Extract<Profile, { role: R }>;

const ID_PATTERN = /^[a-z0-9][a-z0-9._-]{0,63}$/;
const TOP_LEVEL_FIELDS = new Set(['id', 'role', 'description', 'init', 'checkErrors', 'timeoutS', 'operations', 'generator', 'meter', 'scope']);

/** Validates parsed JSON as a profile. `file` names it in every error. */
export function validateProfile(json: unknown, file: string, builtIn = false): Profile {
  const fail = (field: string, message: string): never => {
    throw new ProfileError(file, field, message);
  };
  if (!isRecord(json)) return fail('(top level)', 'must be a JSON object');
  for (const key of Object.keys(json)) if (!TOP_LEVEL_FIELDS.has(key)) fail(key, `is not a profile field (known: ${[...TOP_LEVEL_FIELDS].join(', ')})`);

  const id = json.id;
  if (typeof id !== 'string' || !ID_PATTERN.test(id)) fail('id', 'must be lower-case letters, digits, ".", "_" or "-" (1–64 characters)');
  const role = json.role;
  if (role !== 'generator' && role !== 'meter' && role !== 'scope') return fail('role', 'must be "generator", "meter" or "scope"');
  const description = json.description ?? '';
  if (typeof description !== 'string') fail('description', 'must be text');
  const init = json.init ?? [];
  if (!Array.isArray(init) || init.some((c) => typeof c !== 'string')) fail('init', 'must be a list of commands');
  (init as string[]).forEach((command, i) => checkTemplate(file, `init[${i}]`, command, []));
  const checkErrors = json.checkErrors ?? true;
  if (typeof checkErrors !== 'boolean') fail('checkErrors', 'must be true or false');
  // Without the error queue a refused amplitude or offset goes unseen, and the stimulus limit could not be held.
  if (role === 'generator' && checkErrors === false) fail('checkErrors', 'must be true for a generator: a refused amplitude or offset must be seen to keep the maximum stimulus');
  const timeoutS = json.timeoutS ?? 5;
  if (typeof timeoutS !== 'number' || !(timeoutS > 0 && timeoutS <= 600)) fail('timeoutS', 'must be a number of seconds between 0 and 600');

  const operations = validateOperations(file, role, json.operations);
  const common = { id: id as string, description: description as string, init: init as string[], checkErrors: checkErrors as boolean, timeoutS: timeoutS as number, operations, source: file, builtIn };

  for (const other of INSTRUMENT_ROLES) {
    if (other !== role && json[other] !== undefined) fail(other, `settings for a ${other} in a ${role} profile`);
  }
  if (role === 'generator') return { ...common, role, generator: validateGeneratorSettings(file, json.generator) };
  if (role === 'meter') return { ...common, role, meter: validateMeterSettings(file, json.meter) };
  return { ...common, role, scope: validateScopeSettings(file, json.scope) };
}

function validateOperations(file: string, role: InstrumentRole, raw: unknown): Record<string, string[]> {
  if (!isRecord(raw)) throw new ProfileError(file, 'operations', 'must be an object mapping operation names to commands');
  const rules = OPERATION_RULES[role];
  const operations: Record<string, string[]> = {};
  for (const [name, value] of Object.entries(raw)) {
    const rule = rules[name];
    const field = `operations.${name}`;
    if (!rule) throw new ProfileError(file, field, `is not a ${role} operation (known: ${Object.keys(rules).join(', ')})`);
    const commands = typeof value === 'string' ? [value] : value;
    if (!Array.isArray(commands) || commands.length === 0 || commands.some((c) => typeof c !== 'string')) {
      throw new ProfileError(file, field, 'must be a command or a non-empty list of commands');
    }
    commands.forEach((command: string, i: number) => checkTemplate(file, commands.length > 1 ? `${field}[${i}]` : field, command, rule.placeholders));
    const queries = commands.map((c: string) => isQuery(c));
    if (rule.query && !queries[queries.length - 1]) throw new ProfileError(file, field, `must end with a query (a header ending in "?") — it ${rule.description}`);
    const strayQuery = queries.findIndex((q: boolean, i: number) => q && (!rule.query || i < queries.length - 1));
    if (strayQuery >= 0) throw new ProfileError(file, field, `command "${commands[strayQuery]}" is a query in a place where its reply would not be read`);
    operations[name] = commands as string[];
  }
  for (const [name, rule] of Object.entries(rules)) {
    if (rule.required && !operations[name]) throw new ProfileError(file, `operations.${name}`, `is missing (needed to ${rule.description})`);
  }
  return operations;
}

function checkTemplate(file: string, field: string, command: string, allowed: readonly string[]): void {
  const result = templatePlaceholders(command);
  if ('problem' in result) throw new ProfileError(file, field, `template ${result.problem}`);
  for (const name of result.names) {
    if (!allowed.includes(name)) {
      throw new ProfileError(file, field, `unknown placeholder {${name}}${allowed.length ? ` (this operation offers ${allowed.map((a) => `{${a}}`).join(', ')})` : ' (this operation takes no values)'}`);
    }
  }
}

function positiveNumber(file: string, field: string, value: unknown, fallback?: number): number {
  const v = value ?? fallback;
  if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) throw new ProfileError(file, field, 'must be a positive number');
  return v;
}

function validateGeneratorSettings(file: string, raw: unknown): GeneratorProfile['generator'] {
  if (!isRecord(raw)) throw new ProfileError(file, 'generator', 'must be an object with minFrequencyHz, maxFrequencyHz, maxAmplitudeVpp, amplitudeUnit');
  const minFrequencyHz = positiveNumber(file, 'generator.minFrequencyHz', raw.minFrequencyHz);
  const maxFrequencyHz = positiveNumber(file, 'generator.maxFrequencyHz', raw.maxFrequencyHz);
  if (!(maxFrequencyHz > minFrequencyHz)) throw new ProfileError(file, 'generator.maxFrequencyHz', 'must be above minFrequencyHz');
  const maxAmplitudeVpp = positiveNumber(file, 'generator.maxAmplitudeVpp', raw.maxAmplitudeVpp);
  const minAmplitudeVpp = raw.minAmplitudeVpp ?? 0;
  if (typeof minAmplitudeVpp !== 'number' || !Number.isFinite(minAmplitudeVpp) || minAmplitudeVpp < 0 || minAmplitudeVpp >= maxAmplitudeVpp) {
    throw new ProfileError(file, 'generator.minAmplitudeVpp', 'must be a number from 0 up to below maxAmplitudeVpp');
  }
  const amplitudeUnit = raw.amplitudeUnit ?? 'Vpp';
  if (amplitudeUnit !== 'Vpp' && amplitudeUnit !== 'Vrms') throw new ProfileError(file, 'generator.amplitudeUnit', 'must be "Vpp" or "Vrms"');
  const sourceImpedanceOhm = positiveNumber(file, 'generator.sourceImpedanceOhm', raw.sourceImpedanceOhm, 50);
  return { limits: { minFrequencyHz, maxFrequencyHz, maxAmplitudeVpp, minAmplitudeVpp }, amplitudeUnit, sourceImpedanceOhm };
}

function validateMeterSettings(file: string, raw: unknown): MeterProfile['meter'] {
  const settings = raw ?? {};
  if (!isRecord(settings)) throw new ProfileError(file, 'meter', 'must be an object');
  const powerLineHz = settings.powerLineHz ?? 50;
  if (powerLineHz !== 50 && powerLineHz !== 60) throw new ProfileError(file, 'meter.powerLineHz', 'must be 50 or 60');
  return { powerLineHz };
}

function validateScopeSettings(file: string, raw: unknown): ScopeProfile['scope'] {
  if (!isRecord(raw)) throw new ProfileError(file, 'scope', 'must be an object with divisions, encoding, preambleFields');
  const divisions = positiveNumber(file, 'scope.divisions', raw.divisions, 10);
  if (!Number.isInteger(divisions)) throw new ProfileError(file, 'scope.divisions', 'must be a whole number');
  const encoding = raw.encoding;
  if (!WAVEFORM_ENCODINGS.includes(encoding as WaveformEncoding)) throw new ProfileError(file, 'scope.encoding', `must be one of ${WAVEFORM_ENCODINGS.join(', ')}`);
  const fields = raw.preambleFields;
  if (!Array.isArray(fields)) throw new ProfileError(file, 'scope.preambleFields', 'must be a list of field names');
  fields.forEach((f, i) => {
    if (!PREAMBLE_FIELDS.includes(f)) throw new ProfileError(file, `scope.preambleFields[${i}]`, `"${f}" is not one of ${PREAMBLE_FIELDS.join(', ')}`);
  });
  if (!fields.includes('sampleIntervalS')) throw new ProfileError(file, 'scope.preambleFields', 'must include sampleIntervalS');
  if (String(encoding).startsWith('int') && !fields.includes('voltsPerCode')) throw new ProfileError(file, 'scope.preambleFields', 'must include voltsPerCode for an integer encoding');
  return { divisions, encoding: encoding as WaveformEncoding, preambleFields: fields as PreambleField[] };
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}
