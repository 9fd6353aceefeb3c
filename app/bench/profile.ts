/**
 * Profiles: the SCPI command templates for one instrument role, kept as JSON
 * data a user can write from their instrument's programming manual. Checked
 * once when loaded by the schemas here (valibot, the contract's field
 * helpers); the types are inferred from them. Every problem names the file,
 * the field, what was expected and what to do.
 */
import * as v from 'valibot';
import { INSTRUMENT_ROLES, type InstrumentRole } from '../contract/contract';
import { checkFirst, checkOrProblem, fieldFirst, fields, finiteNumber, objectExpected, oneOf, recordOf, trueOrFalse, withDefault, withHint, withRule } from '../contract/field-schemas';
import { ProfileError } from './errors';
import { InitSchema, noteText, operationsSchema, splitWaits } from './profile-operations';
import { GeneratorSettingsSchema, MeterSettingsSchema } from './profile-settings';
import { ScopeSettingsSchema } from './profile-scope';

export { OPERATION_RULES, type OperationRule } from './profile-operations';
export * from './profile-settings';
export * from './profile-scope';

export const PROGRAM_MESSAGE_POLICIES = ['joined', 'separate'] as const;
export type ProgramMessagePolicy = (typeof PROGRAM_MESSAGE_POLICIES)[number];

const ID_PATTERN = /^[a-z0-9][a-z0-9._-]{0,63}$/;
const ID_MESSAGE = 'must be lower-case letters, digits, ".", "_" or "-" (1–64 characters)';
const IdSchema = v.pipe(v.string(ID_MESSAGE), v.regex(ID_PATTERN, ID_MESSAGE));
const RoleSchema = oneOf(INSTRUMENT_ROLES);

/** The fields every profile has, whatever its role. */
function commonFields<R extends InstrumentRole>(role: R) {
  return {
    id: IdSchema,
    role: v.literal(role),
    description: withDefault(noteText, ''),
    /** Sent once after connecting (e.g. *CLS, data format). */
    init: InitSchema,
    /** Read the error queue after each batch of settings (see operation.ts) and fail on the first error. */
    checkErrors: withDefault(trueOrFalse, true),
    timeoutS: withDefault(v.pipe(finiteNumber, v.check((s) => s > 0 && s <= 600, (issue) => `must be a number of seconds between 0 and 600, got ${issue.input}`)), 5),
    /** Operation name → commands, in order; and → seconds to wait after each of its commands (only operations that have a wait). */
    operations: operationsSchema(role),
    /**
     * How several commands go out: "joined" — one program message, units separated by ';' (IEEE 488.2
     * §7.1, recalled from memory); "separate" — one write per command, for instruments that refuse ';'.
     */
    programMessages: withDefault(
      v.picklist(PROGRAM_MESSAGE_POLICIES, 'must be "joined" (one program message, units separated by ";") or "separate" (one write per command)'),
      'joined',
    ),
    /** Where each command comes from (a standard's volume and chapter, or "our own"): field path → text. Shown, never sent. */
    references: withDefault(recordOf(noteText, objectExpected('must map fields (e.g. "operations.frequency") to text')), {}),
  };
}

/** The top-level fields of any profile, for the message about an unknown one. */
const PROFILE_FIELDS = [...Object.keys(commonFields('meter')), ...INSTRUMENT_ROLES];

/** A reference names an operation or init command of the profile, or a settings field. */
function unknownReference(profile: { references: Record<string, string>; operations: Record<string, unknown>; init: string[] }) {
  for (const key of Object.keys(profile.references)) {
    const operation = /^operations\.(\w+)$/.exec(key);
    const initIndex = /^init\[(\d+)\]$/.exec(key);
    const known =
      (operation !== null && Object.hasOwn(profile.operations, operation[1])) ||
      (initIndex !== null && Number(initIndex[1]) < profile.init.length) ||
      /^(scope|generator|meter)\./.test(key);
    if (!known) return { at: ['references', key], message: withHint('names no operation or init command of this profile', 'Name a field of this file, e.g. "operations.frequency" or "init[0]".') };
  }
  return undefined;
}

// A generator's refused amplitude or offset must be seen (the error queue) to keep the maximum stimulus.
const generatorCheckErrors = withDefault(
  v.pipe(trueOrFalse, v.check((on) => on, withHint('must be true for a generator: a refused amplitude or offset must be seen to keep the maximum stimulus', 'Set "checkErrors": true.'))),
  true,
);

/** The load operations exist exactly when the load setting means something. */
function loadOperationRule(profile: { operations: Record<string, unknown>; generator: { load: string } }) {
  for (const name of ['loadHighZ', 'load50Ohm']) {
    const given = Object.hasOwn(profile.operations, name);
    if (profile.generator.load === 'calibrated' && !given) return { at: ['operations', name], message: withHint('is missing (generator.load is "calibrated")', 'Add the command that sets the load, or set generator.load to "none".') };
    if (profile.generator.load === 'none' && given) {
      return { at: ['operations', name], message: 'has no meaning with generator.load "none": set generator.load to "calibrated" if the instrument scales its amplitude for the load, or remove it' };
    }
  }
  return undefined;
}

/** The scaling query exists exactly when the scaling reads fields from it. */
function scalingQueryRule(profile: { operations: Record<string, unknown>; scope: { scaling: { fields: readonly string[] } } }) {
  const needsQuery = profile.scope.scaling.fields.length > 0;
  const given = Object.hasOwn(profile.operations, 'waveformScaling');
  if (needsQuery && !given) return { at: ['operations', 'waveformScaling'], message: withHint('is missing (scope.scaling.fields names the numbers of its reply)', 'Add the query, or give the scaling as scope.scaling.fixed.') };
  if (!needsQuery && given) return { at: ['operations', 'waveformScaling'], message: 'has no fields to read: list them in scope.scaling.fields, or remove the operation' };
  return undefined;
}

const generatorFields = fields({ ...commonFields('generator'), checkErrors: generatorCheckErrors, generator: GeneratorSettingsSchema }, [], 'profile field');
const meterFields = fields({ ...commonFields('meter'), meter: MeterSettingsSchema }, [], 'profile field');
const scopeFields = fields({ ...commonFields('scope'), scope: ScopeSettingsSchema }, [], 'profile field');

// References are checked last: one naming a missing operation is a smaller problem than the missing operation.
const GeneratorProfileSchema = v.pipe(withRule(withRule(generatorFields, loadOperationRule), unknownReference), v.transform(splitWaits));
const MeterProfileSchema = v.pipe(withRule(meterFields, unknownReference), v.transform(splitWaits));
const ScopeProfileSchema = v.pipe(withRule(withRule(scopeFields, scalingQueryRule), unknownReference), v.transform(splitWaits));

const ROLE_SCHEMAS = { generator: GeneratorProfileSchema, meter: MeterProfileSchema, scope: ScopeProfileSchema };

/** A profile file as written, for any role: checked by the schema of its role. */
export const ProfileSchema = v.pipe(
  objectExpected('must be a JSON object'),
  checkFirst((json) => {
    const unknown = Object.keys(json).find((key) => !PROFILE_FIELDS.includes(key));
    return unknown === undefined ? undefined : { key: unknown, message: withHint('is not a profile field', `Known fields: ${PROFILE_FIELDS.join(', ')}.`) };
  }),
  checkFirst(fieldFirst('id', IdSchema)),
  checkFirst(fieldFirst('role', RoleSchema)),
  checkFirst((json) => {
    const other = INSTRUMENT_ROLES.find((role) => role !== json.role && json[role] !== undefined);
    return other === undefined ? undefined : { key: other, message: withHint(`settings for a ${other} in a ${String(json.role)} profile`, `Remove "${other}", or set "role" to "${other}".`) };
  }),
  v.lazy((json) => ROLE_SCHEMAS[(json as { role: InstrumentRole }).role]),
);

/** Where a profile was loaded from. */
interface Loaded {
  /** File it came from ("built-in: NAME.json" for shipped ones). */
  source: string;
  builtIn: boolean;
}

type Checked<S extends v.GenericSchema> = v.InferOutput<S> & Loaded;

export type GeneratorProfile = Checked<typeof GeneratorProfileSchema>;
export type MeterProfile = Checked<typeof MeterProfileSchema>;
export type ScopeProfile = Checked<typeof ScopeProfileSchema>;
export type Profile = GeneratorProfile | MeterProfile | ScopeProfile;
export type ProfileFor<R extends InstrumentRole> = Extract<Profile, { role: R }>;

/** Checks parsed JSON as a profile. `file` names it in every error. */
export function validateProfile(json: unknown, file: string, builtIn = false): Profile {
  const result = checkOrProblem(ProfileSchema, json);
  if ('problem' in result) {
    const { path, message, hint } = result.problem;
    throw new ProfileError(file, path.replace(/^\./, '') || '(top level)', message, hint);
  }
  return { ...result.output, source: file, builtIn };
}
