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
    // Only with generator.load "calibrated": the instrument scales its amplitude for the load it is told of.
    loadHighZ: op('amplitude calibrated for a high-impedance load', [], false, false),
    load50Ohm: op('amplitude calibrated for a 50 Ω load', [], false, false),
    readFrequency: op('read the frequency back', [], true),
    readOutput: op('read the output state back (1 or ON: on, 0 or OFF: off)', [], true, false),
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
    verticalScale: op('vertical scale of a channel', ['channel', 'voltsPerDiv', 'rangeV', 'rangeVpp']),
    timebase: op('horizontal scale', ['secondsPerDiv', 'secondsPerRecord']),
    recordPoints: op('number of samples in one record (noise runs set it; without it they take the record as it comes)', ['points'], false, false),
    // Completion (scope.acquisitionComplete) is added by the control: *OPC? in the same message, or a status poll.
    acquire: op('start one record of both channels'),
    waveformScaling: op('the numbers that scale a channel\'s data (scope.scaling.fields)', ['channel'], true, false),
    waveformData: op('waveform data of a channel', ['channel'], true),
    // One program message, one response message: per channel 1 then 2, its scaling reply (when scope.scaling.fields has any) and its data.
    waveformBoth: op('scaling and data of channel 1, then of channel 2, in one response message', [], true, false),
    measureAmplitudeVpp: op('peak-to-peak of a channel', ['channel'], true, false),
    measurePhaseDeg: op('phase of channel 2 relative to channel 1', [], true, false),
  },
};

/** Binary sample types: two's complement (int), offset-free unsigned (uint) or IEEE 754 (float). */
export const SAMPLE_TYPES = ['int8', 'uint8', 'int16', 'uint16', 'int32', 'float32', 'float64'] as const;
export type SampleType = (typeof SAMPLE_TYPES)[number];
export const BYTE_ORDERS = ['big', 'little'] as const;
export type ByteOrder = (typeof BYTE_ORDERS)[number];

/**
 * How a channel's data arrives: a comma-separated list of numbers (ASCII), or
 * a definite-length block (IEEE 488.2 §8.7.9, recalled from memory) of samples.
 */
export type WaveformData = { format: 'ascii' } | { format: 'binary'; sample: SampleType; byteOrder: ByteOrder };

/** Quantities that scale data; volts = (code − codeOffset) · voltsPerCode + voltsOffset. */
export const SCALING_QUANTITIES = ['points', 'sampleIntervalS', 'xOriginS', 'voltsPerCode', 'codeOffset', 'voltsOffset'] as const;
export type ScalingQuantity = (typeof SCALING_QUANTITIES)[number];
/** Names a field of the scaling reply may take ('ignore' skips one). */
export type ScalingField = ScalingQuantity | 'ignore';

export interface WaveformScalingSource {
  /** The numbers of the waveformScaling reply, in order; empty when there is no such query. */
  fields: ScalingField[];
  /** Quantities that do not change, e.g. volts per code of a converter with a fixed range. */
  fixed: Partial<Record<ScalingQuantity, number>>;
}

/** A status value the poll waits for: equal to a number, or with all bits of a mask clear or set. */
export type PollCondition = { equals: number } | { bitsClear: number } | { bitsSet: number };

/** How the control learns an acquisition is complete. */
export type AcquisitionComplete = { method: 'opc' } | { method: 'poll'; query: string; until: PollCondition; intervalS: number };

export const PROGRAM_MESSAGE_POLICIES = ['joined', 'separate'] as const;
export type ProgramMessagePolicy = (typeof PROGRAM_MESSAGE_POLICIES)[number];

export const AMPLITUDE_UNITS = ['Vpp', 'Vrms', 'Vpk'] as const;
export type AmplitudeUnit = (typeof AMPLITUDE_UNITS)[number];
export const LOAD_MEANINGS = ['none', 'calibrated'] as const;
export type LoadMeaning = (typeof LOAD_MEANINGS)[number];

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
  /** Operation name → seconds to wait after each of its commands (only operations that have a wait). */
  waitsS: Record<string, number[]>;
  /**
   * How several commands go out: "joined" — one program message, units separated by ';' (IEEE 488.2
   * §7.1, recalled from memory); "separate" — one write per command, for instruments that refuse ';'.
   */
  programMessages: ProgramMessagePolicy;
  /** Where each command comes from (a standard's volume and chapter, or "our own"): field path → text. Shown, never sent. */
  references: Record<string, string>;
  /** File it came from ("built-in: NAME.json" for shipped ones). */
  source: string;
  builtIn: boolean;
}

export interface GeneratorProfile extends ProfileCommon {
  role: 'generator';
  generator: {
    limits: GeneratorLimits;
    /** What the number of the amplitude command means for a sine: peak-to-peak, RMS or peak volts. */
    amplitudeUnit: AmplitudeUnit;
    /**
     * What the instrument's load setting means: "none" — it has none, its amplitude is the open-circuit
     * voltage; "calibrated" — its amplitude is what it delivers into the load it is told of (loadHighZ /
     * load50Ohm), so at 50 Ω the open-circuit voltage is twice the setting.
     */
    load: LoadMeaning;
    sourceImpedanceOhm: number;
  };
}

export interface MeterProfile extends ProfileCommon {
  role: 'meter';
  meter: { powerLineHz: number };
}

export interface ScopeProfile extends ProfileCommon {
  role: 'scope';
  scope: {
    /** Horizontal divisions ({secondsPerDiv} = record ÷ divisions). */
    divisions: number;
    /** Vertical divisions on screen: {rangeVpp} = voltsPerDiv · verticalDivisions, {rangeV} half that. */
    verticalDivisions: number;
    data: WaveformData;
    scaling: WaveformScalingSource;
    acquisitionComplete: AcquisitionComplete;
  };
}

export type Profile = GeneratorProfile | MeterProfile | ScopeProfile;
export type ProfileFor<R extends InstrumentRole> = Extract<Profile, { role: R }>;

const ID_PATTERN = /^[a-z0-9][a-z0-9._-]{0,63}$/;
const TOP_LEVEL_FIELDS = new Set(['id', 'role', 'description', 'init', 'checkErrors', 'timeoutS', 'operations', 'programMessages', 'references', 'generator', 'meter', 'scope']);

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

  const { operations, waitsS } = validateOperations(file, role, json.operations);
  const programMessages = json.programMessages ?? 'joined';
  if (!PROGRAM_MESSAGE_POLICIES.includes(programMessages as ProgramMessagePolicy)) fail('programMessages', 'must be "joined" (one program message, units separated by ";") or "separate" (one write per command)');
  const common = {
    id: id as string, description: description as string, init: init as string[], checkErrors: checkErrors as boolean, timeoutS: timeoutS as number,
    operations, waitsS, programMessages: programMessages as ProgramMessagePolicy, source: file, builtIn,
  };
  // Checked last: a reference to a missing operation is a smaller problem than the missing operation.
  const references = () => validateReferences(file, json.references, operations, init as string[]);

  for (const other of INSTRUMENT_ROLES) {
    if (other !== role && json[other] !== undefined) fail(other, `settings for a ${other} in a ${role} profile`);
  }
  if (role === 'generator') {
    const generator = validateGeneratorSettings(file, json.generator);
    checkGeneratorOperations(file, generator, operations);
    return { ...common, references: references(), role, generator };
  }
  if (role === 'meter') {
    const meter = validateMeterSettings(file, json.meter);
    return { ...common, references: references(), role, meter };
  }
  const scope = validateScopeSettings(file, json.scope);
  checkScopeOperations(file, scope, operations);
  return { ...common, references: references(), role, scope };
}

function validateOperations(file: string, role: InstrumentRole, raw: unknown): { operations: Record<string, string[]>; waitsS: Record<string, number[]> } {
  if (!isRecord(raw)) throw new ProfileError(file, 'operations', 'must be an object mapping operation names to commands');
  const rules = OPERATION_RULES[role];
  const operations: Record<string, string[]> = {};
  const waitsS: Record<string, number[]> = {};
  for (const [name, value] of Object.entries(raw)) {
    const rule = rules[name];
    const field = `operations.${name}`;
    if (!rule) throw new ProfileError(file, field, `is not a ${role} operation (known: ${Object.keys(rules).join(', ')})`);
    const entries: unknown[] = typeof value === 'string' || isRecord(value) ? [value] : Array.isArray(value) ? value : [];
    if (entries.length === 0) throw new ProfileError(file, field, 'must be a command or a non-empty list of commands');
    // A command is text, or {"send": text, "waitS": seconds} to wait after it (an instrument that needs time to settle a setting).
    const waits: number[] = [];
    const commands = entries.map((entry, i) => {
      const where = entries.length > 1 ? `${field}[${i}]` : field;
      if (typeof entry === 'string') {
        waits.push(0);
        return entry;
      }
      if (!isRecord(entry) || typeof entry.send !== 'string' || Object.keys(entry).some((k) => k !== 'send' && k !== 'waitS')) {
        throw new ProfileError(file, where, 'must be a command, or {"send": COMMAND, "waitS": SECONDS}');
      }
      const waitS = entry.waitS ?? 0;
      if (typeof waitS !== 'number' || !(waitS >= 0 && waitS <= 60)) throw new ProfileError(file, `${where}.waitS`, 'must be a number of seconds from 0 to 60');
      waits.push(waitS);
      return entry.send;
    });
    if (waits.some((w) => w > 0)) waitsS[name] = waits;
    commands.forEach((command: string, i: number) => checkTemplate(file, commands.length > 1 ? `${field}[${i}]` : field, command, rule.placeholders));
    const queries = commands.map((c: string) => isQuery(c));
    if (rule.query && !queries[queries.length - 1]) throw new ProfileError(file, field, `must end with a query (a header ending in "?") — it ${rule.description}`);
    const strayQuery = queries.findIndex((q: boolean, i: number) => q && (!rule.query || i < queries.length - 1));
    if (strayQuery >= 0) throw new ProfileError(file, field, `command "${commands[strayQuery]}" is a query in a place where its reply would not be read`);
    operations[name] = commands;
  }
  for (const [name, rule] of Object.entries(rules)) {
    if (rule.required && !operations[name]) throw new ProfileError(file, `operations.${name}`, `is missing (needed to ${rule.description})`);
  }
  return { operations, waitsS };
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
  if (!AMPLITUDE_UNITS.includes(amplitudeUnit as AmplitudeUnit)) throw new ProfileError(file, 'generator.amplitudeUnit', `must be one of ${AMPLITUDE_UNITS.map((u) => `"${u}"`).join(', ')}`);
  const load = raw.load ?? 'none';
  if (!LOAD_MEANINGS.includes(load as LoadMeaning)) throw new ProfileError(file, 'generator.load', '"none" (no load setting: the amplitude is the open-circuit voltage) or "calibrated" (the amplitude is into the load set by loadHighZ / load50Ohm)');
  const sourceImpedanceOhm = positiveNumber(file, 'generator.sourceImpedanceOhm', raw.sourceImpedanceOhm, 50);
  return { limits: { minFrequencyHz, maxFrequencyHz, maxAmplitudeVpp, minAmplitudeVpp }, amplitudeUnit: amplitudeUnit as AmplitudeUnit, load: load as LoadMeaning, sourceImpedanceOhm };
}

/** The load operations exist exactly when the load setting means something. */
function checkGeneratorOperations(file: string, generator: GeneratorProfile['generator'], operations: Record<string, string[]>): void {
  for (const name of ['loadHighZ', 'load50Ohm']) {
    if (generator.load === 'calibrated' && !operations[name]) throw new ProfileError(file, `operations.${name}`, 'is missing (generator.load is "calibrated")');
    if (generator.load === 'none' && operations[name]) throw new ProfileError(file, `operations.${name}`, 'has no meaning with generator.load "none": set generator.load to "calibrated" if the instrument scales its amplitude for the load, or remove it');
  }
}

function validateMeterSettings(file: string, raw: unknown): MeterProfile['meter'] {
  const settings = raw ?? {};
  if (!isRecord(settings)) throw new ProfileError(file, 'meter', 'must be an object');
  const powerLineHz = settings.powerLineHz ?? 50;
  if (powerLineHz !== 50 && powerLineHz !== 60) throw new ProfileError(file, 'meter.powerLineHz', 'must be 50 or 60');
  return { powerLineHz };
}

function validateScopeSettings(file: string, raw: unknown): ScopeProfile['scope'] {
  if (!isRecord(raw)) throw new ProfileError(file, 'scope', 'must be an object with divisions, data, scaling and acquisitionComplete');
  for (const old of ['encoding', 'preambleFields']) {
    if (raw[old] !== undefined) throw new ProfileError(file, `scope.${old}`, 'is an older form: describe the data with scope.data and scope.scaling (see app/bench/profiles/README.md)');
  }
  const known = ['divisions', 'verticalDivisions', 'data', 'scaling', 'acquisitionComplete'];
  for (const key of Object.keys(raw)) if (!known.includes(key)) throw new ProfileError(file, `scope.${key}`, `is not a scope field (known: ${known.join(', ')})`);
  const divisions = wholeNumber(file, 'scope.divisions', raw.divisions, 10);
  const verticalDivisions = wholeNumber(file, 'scope.verticalDivisions', raw.verticalDivisions, 10);
  const data = validateWaveformData(file, raw.data);
  const scaling = validateScaling(file, raw.scaling, data);
  const acquisitionComplete = validateAcquisitionComplete(file, raw.acquisitionComplete);
  return { divisions, verticalDivisions, data, scaling, acquisitionComplete };
}

function wholeNumber(file: string, field: string, value: unknown, fallback: number): number {
  const v = positiveNumber(file, field, value, fallback);
  if (!Number.isInteger(v)) throw new ProfileError(file, field, 'must be a whole number');
  return v;
}

function validateWaveformData(file: string, raw: unknown): WaveformData {
  if (!isRecord(raw)) throw new ProfileError(file, 'scope.data', 'must be {"format": "ascii"} or {"format": "binary", "sample": …, "byteOrder": …}');
  if (raw.format === 'ascii') {
    for (const key of Object.keys(raw)) if (key !== 'format') throw new ProfileError(file, `scope.data.${key}`, 'does not apply to ASCII data');
    return { format: 'ascii' };
  }
  if (raw.format !== 'binary') throw new ProfileError(file, 'scope.data.format', 'must be "ascii" or "binary"');
  if (!SAMPLE_TYPES.includes(raw.sample as SampleType)) throw new ProfileError(file, 'scope.data.sample', `must be one of ${SAMPLE_TYPES.join(', ')}`);
  const sample = raw.sample as SampleType;
  const single = sample === 'int8' || sample === 'uint8';
  const byteOrder = raw.byteOrder ?? (single ? 'big' : undefined);
  if (!BYTE_ORDERS.includes(byteOrder as ByteOrder)) throw new ProfileError(file, 'scope.data.byteOrder', `must be "big" (most significant byte first) or "little"`);
  for (const key of Object.keys(raw)) if (!['format', 'sample', 'byteOrder'].includes(key)) throw new ProfileError(file, `scope.data.${key}`, 'is not a data field (known: format, sample, byteOrder)');
  return { format: 'binary', sample, byteOrder: byteOrder as ByteOrder };
}

function validateScaling(file: string, raw: unknown, data: WaveformData): WaveformScalingSource {
  if (!isRecord(raw)) throw new ProfileError(file, 'scope.scaling', 'must be an object with "fields" (the scaling reply\'s numbers, in order) and/or "fixed" values');
  for (const key of Object.keys(raw)) if (key !== 'fields' && key !== 'fixed') throw new ProfileError(file, `scope.scaling.${key}`, 'is not a scaling field (known: fields, fixed)');
  const fieldsRaw = raw.fields ?? [];
  if (!Array.isArray(fieldsRaw)) throw new ProfileError(file, 'scope.scaling.fields', 'must be a list of field names');
  const fields: ScalingField[] = [];
  fieldsRaw.forEach((f, i) => {
    if (f !== 'ignore' && !SCALING_QUANTITIES.includes(f)) throw new ProfileError(file, `scope.scaling.fields[${i}]`, `"${f}" is not one of ${[...SCALING_QUANTITIES, 'ignore'].join(', ')}`);
    if (f !== 'ignore' && fields.includes(f)) throw new ProfileError(file, `scope.scaling.fields[${i}]`, `"${f}" appears twice`);
    fields.push(f);
  });
  const fixedRaw = raw.fixed ?? {};
  if (!isRecord(fixedRaw)) throw new ProfileError(file, 'scope.scaling.fixed', 'must map quantities to numbers');
  const fixed: Partial<Record<ScalingQuantity, number>> = {};
  for (const [name, value] of Object.entries(fixedRaw)) {
    const field = `scope.scaling.fixed.${name}`;
    if (!SCALING_QUANTITIES.includes(name as ScalingQuantity)) throw new ProfileError(file, field, `is not one of ${SCALING_QUANTITIES.join(', ')}`);
    if (fields.includes(name as ScalingField)) throw new ProfileError(file, field, 'is also read from the scaling reply: give it one source');
    if (typeof value !== 'number' || !Number.isFinite(value)) throw new ProfileError(file, field, 'must be a number');
    if ((name === 'sampleIntervalS' || name === 'voltsPerCode') && !(value > 0)) throw new ProfileError(file, field, 'must be positive');
    if (name === 'points' && !(Number.isInteger(value) && value > 0)) throw new ProfileError(file, field, 'must be a positive whole number');
    fixed[name as ScalingQuantity] = value;
  }
  const given = (q: ScalingQuantity) => fields.includes(q) || fixed[q] !== undefined;
  if (!given('sampleIntervalS')) throw new ProfileError(file, 'scope.scaling', 'must give sampleIntervalS (a field of the scaling reply, or fixed)');
  const integer = data.format === 'binary' && !data.sample.startsWith('float');
  if (integer && !given('voltsPerCode')) throw new ProfileError(file, 'scope.scaling', `must give voltsPerCode for ${data.format === 'binary' ? data.sample : ''} samples (a field of the scaling reply, or fixed)`);
  return { fields, fixed };
}

function validateAcquisitionComplete(file: string, raw: unknown): AcquisitionComplete {
  const field = 'scope.acquisitionComplete';
  if (raw === undefined || raw === 'opc' || (isRecord(raw) && raw.method === 'opc' && Object.keys(raw).length === 1)) return { method: 'opc' };
  if (!isRecord(raw) || raw.method !== 'poll') throw new ProfileError(file, field, 'must be "opc" (*OPC? after the start) or {"method": "poll", "query": …, "until": …}');
  for (const key of Object.keys(raw)) if (!['method', 'query', 'until', 'intervalS'].includes(key)) throw new ProfileError(file, `${field}.${key}`, 'is not a poll field (known: method, query, until, intervalS)');
  if (typeof raw.query !== 'string') throw new ProfileError(file, `${field}.query`, 'must be a query, e.g. "STATus:OPERation:CONDition?"');
  checkTemplate(file, `${field}.query`, raw.query, []);
  if (!isQuery(raw.query)) throw new ProfileError(file, `${field}.query`, 'must be a query (a header ending in "?")');
  const until = raw.until;
  const conditions = ['equals', 'bitsClear', 'bitsSet'];
  if (!isRecord(until) || Object.keys(until).length !== 1 || !conditions.includes(Object.keys(until)[0])) {
    throw new ProfileError(file, `${field}.until`, 'must be one of {"equals": N}, {"bitsClear": MASK}, {"bitsSet": MASK}');
  }
  const [kind, value] = Object.entries(until)[0];
  if (typeof value !== 'number' || !Number.isFinite(value) || (kind !== 'equals' && !(Number.isInteger(value) && value > 0))) {
    throw new ProfileError(file, `${field}.until.${kind}`, kind === 'equals' ? 'must be a number' : 'must be a positive whole number (a bit mask)');
  }
  const intervalS = positiveNumber(file, `${field}.intervalS`, raw.intervalS, 0.01);
  return { method: 'poll', query: raw.query, until: { [kind]: value } as PollCondition, intervalS };
}

/** The scaling query exists exactly when the scaling reads fields from it. */
function checkScopeOperations(file: string, scope: ScopeProfile['scope'], operations: Record<string, string[]>): void {
  const needsQuery = scope.scaling.fields.length > 0;
  if (needsQuery && !operations.waveformScaling) throw new ProfileError(file, 'operations.waveformScaling', 'is missing (scope.scaling.fields names the numbers of its reply)');
  if (!needsQuery && operations.waveformScaling) throw new ProfileError(file, 'operations.waveformScaling', 'has no fields to read: list them in scope.scaling.fields, or remove the operation');
}

function validateReferences(file: string, raw: unknown, operations: Record<string, string[]>, init: string[]): Record<string, string> {
  if (raw === undefined) return {};
  if (!isRecord(raw)) throw new ProfileError(file, 'references', 'must map fields (e.g. "operations.frequency") to text');
  for (const [key, value] of Object.entries(raw)) {
    if (typeof value !== 'string') throw new ProfileError(file, `references.${key}`, 'must be text');
    const operation = /^operations\.(\w+)$/.exec(key);
    const initIndex = /^init\[(\d+)\]$/.exec(key);
    const known = (operation && operations[operation[1]]) || (initIndex && Number(initIndex[1]) < init.length) || /^(scope|generator|meter)\./.test(key);
    if (!known) throw new ProfileError(file, `references.${key}`, 'names no operation or init command of this profile');
  }
  return raw as Record<string, string>;
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}
