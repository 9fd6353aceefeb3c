/**
 * Building blocks for the contract's schemas (valibot), worded the way a user
 * reads them: each message says what was expected and what arrived, and may
 * carry a hint (what to do next). check-call.ts turns the first issue into a
 * ValidationError with the field's path.
 *
 * Why valibot: it runs without eval or new Function (so under the window's
 * content security policy as well as in Node), it is tree-shakable (the window
 * bundles only the few checks it uses) and its schemas give the TypeScript
 * types by inference, so the contract is written once.
 */
import * as v from 'valibot';

/** Separates a message from its hint inside one valibot message string. */
const HINT_MARK = '\u001F';

/** A message with a hint: what happened, then what to do next. */
export function withHint(message: string, hint: string): string {
  return `${message}${HINT_MARK}${hint}`;
}

/** Splits a message made by withHint back into its two parts. */
export function splitHint(text: string): { message: string; hint?: string } {
  const at = text.indexOf(HINT_MARK);
  return at < 0 ? { message: text } : { message: text.slice(0, at), hint: text.slice(at + HINT_MARK.length) };
}

/** Sizes beyond any real use; they keep a hostile caller from making the service work hard. */
export const LIMITS = {
  textChars: 20_000,
  shortTextChars: 500,
  runsPerCall: 200,
  pointsPerDecade: 1_000,
  designJsonChars: 1_000_000,
  count: 10_000,
} as const;

/** The arrived value in a few characters, for "got …". */
export function describeValue(value: unknown): string {
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'a list';
  if (typeof value === 'string') return `"${value.slice(0, 40)}${value.length > 40 ? '…' : ''}"`;
  if (typeof value === 'object') return 'an object';
  return String(value);
}

export function isPlainObject(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

export const plainObject = v.custom<Record<string, unknown>>(isPlainObject, (issue) => `must be an object, got ${describeValue(issue.input)}`);

/** An object, with a message that says which object is expected (its fields, an example). */
export function objectExpected(message: string) {
  return v.custom<Record<string, unknown>>(isPlainObject, message);
}

export const finiteNumber = v.pipe(
  v.number((issue) => `must be a finite number, got ${describeValue(issue.input)}`),
  v.finite((issue) => `must be a finite number, got ${describeValue(issue.input)}`),
);

export function positiveNumber(unit: string) {
  return v.pipe(finiteNumber, v.gtValue(0, (issue) => `must be greater than zero (${unit}), got ${issue.input}`));
}

export function wholeNumber(low: number, high: number) {
  return v.pipe(
    finiteNumber,
    v.check((n) => Number.isInteger(n) && n >= low && n <= high, (issue) => `must be a whole number from ${low} to ${high}, got ${issue.input}`),
  );
}

/** Store ids are database row ids: positive whole numbers. */
export const storeId = v.pipe(
  finiteNumber,
  v.check((n) => Number.isSafeInteger(n) && n >= 1, (issue) => `must be a positive whole number (a store id), got ${issue.input}`),
);

export function oneOf<const T extends readonly string[]>(options: T) {
  return v.picklist(options, (issue) => `must be one of ${options.join(', ')}, got ${describeValue(issue.input)}`);
}

export function text(maxChars: number, allowEmpty: boolean) {
  return v.pipe(
    v.string((issue) => `must be text, got ${describeValue(issue.input)}`),
    v.check((s) => allowEmpty || s.trim() !== '', 'must not be empty'),
    v.check((s) => s.length <= maxChars, (issue) => `is ${issue.input.length} characters long; at most ${maxChars} are accepted`),
  );
}

export function shortText(allowEmpty: boolean) {
  return text(LIMITS.shortTextChars, allowEmpty);
}

export const trueOrFalse = v.boolean((issue) => `must be true or false, got ${describeValue(issue.input)}`);

/**
 * Names to values (part values, template parameters, a file's notes); keys are
 * short non-empty text. Every own key is kept, even one such as "constructor"
 * (valibot's record() leaves those out, which would lose a value silently).
 */
export function recordOf<T>(values: v.GenericSchema<unknown, T>, expected: v.GenericSchema<unknown, Record<string, unknown>> = plainObject) {
  const key = shortText(false);
  return v.pipe(
    expected,
    v.check((o) => Object.keys(o).length <= LIMITS.count, (issue) => `has ${Object.keys(issue.input).length} entries; at most ${LIMITS.count} are accepted`),
    checkFirst((input, config) => {
      for (const [name, value] of Object.entries(input)) {
        const keyResult = v.safeParse(key, name, config);
        if (!keyResult.success) return { key: name, message: keyResult.issues[0].message, asKey: true };
        const valueResult = v.safeParse(values, value, config);
        if (!valueResult.success) return { key: name, message: valueResult.issues[0].message, path: valueResult.issues[0].path };
      }
      return undefined;
    }),
    v.transform((input) => {
      const result: Record<string, T> = {};
      for (const [name, value] of Object.entries(input)) result[name] = value as T;
      return result;
    }),
  );
}

/** Names to numbers (part values, template parameters); see recordOf. */
export function numberRecord(values: v.GenericSchema<unknown, number>) {
  return recordOf(values);
}

/** Optional fields come out without null: absent and null both mean "not given". */
export type Given<O> = { [K in keyof O]: Exclude<O[K], null> };

/** One early check of an object: the problem found (field, message, deeper path), or nothing. */
export type FieldStep = (input: Record<string, unknown>, config: AnyConfig) => FieldProblem | undefined;
type AnyConfig = v.Config<v.BaseIssue<unknown>>;
interface FieldProblem {
  key: string;
  message: string;
  path?: v.IssuePathItem[];
  /** The key itself is wrong, not its value. */
  asKey?: boolean;
}

/**
 * An object with exactly the given fields, checked in the order written.
 * Unknown fields are refused first, naming the known ones (`what` words them:
 * "field", "generator operation"); a missing field is
 * checked as undefined, so it gets its own field's message ("must be text,
 * got undefined") rather than a generic one. Optional fields absent or null
 * are left out of the result. `first` checks some fields before the others,
 * with rules between fields, in the order a reader expects.
 */
export function fields<const E extends v.ObjectEntries>(entries: E, first: readonly FieldStep[] = [], what = 'field') {
  const known = Object.keys(entries);
  return v.pipe(
    plainObject,
    v.rawCheck<Record<string, unknown>>(({ dataset, config, addIssue }) => {
      if (!dataset.typed) return;
      const input = dataset.value;
      const unknown = Object.keys(input).find((key) => !known.includes(key));
      const problem: FieldProblem | undefined =
        unknown !== undefined ? { key: unknown, message: withHint(`is not a known ${what}`, `Known ${what}s: ${known.join(', ')}.`) } : firstProblem(first, input, config as AnyConfig);
      if (problem) addIssue({ message: problem.message, path: [fieldPath(input, problem.key), ...(problem.path ?? [])] });
    }),
    withEveryKey(known),
    v.object(entries),
    v.transform((output) => dropAbsent(output) as Given<typeof output>),
  );
}

/**
 * Gives an object every one of `keys`, undefined where it lacks one, so that a
 * missing field is checked by its own schema ("must be text, got undefined")
 * at its own path, rather than by valibot's generic message for a missing key.
 */
export function withEveryKey(keys: readonly string[]) {
  const absent: Record<string, undefined> = Object.fromEntries(keys.map((key) => [key, undefined]));
  return v.transform((input: Record<string, unknown>) => ({ ...absent, ...input }));
}

function firstProblem(steps: readonly FieldStep[], input: Record<string, unknown>, config: AnyConfig): FieldProblem | undefined {
  for (const step of steps) {
    const problem = step(input, config);
    if (problem) return problem;
  }
  return undefined;
}

/** Runs one FieldStep on an object as a pipe action (before a schema that depends on it). */
export function checkFirst(step: FieldStep) {
  return v.rawCheck<Record<string, unknown>>(({ dataset, config, addIssue }) => {
    if (!dataset.typed) return;
    const problem = step(dataset.value, config as AnyConfig);
    if (problem) addIssue({ message: problem.message, path: [fieldPath(dataset.value, problem.key, problem.asKey ? 'key' : 'value'), ...(problem.path ?? [])] });
  });
}

function fieldPath(input: Record<string, unknown>, key: string, origin: 'key' | 'value' = 'value'): v.ObjectPathItem {
  return { type: 'object', origin, input, key, value: input[key] } as v.ObjectPathItem;
}

/** Checks one field ahead of the rest (see `fields`). */
export function fieldFirst(key: string, schema: v.GenericSchema): FieldStep {
  return (input, config) => {
    const result = v.safeParse(schema, input[key], config);
    if (result.success) return undefined;
    const issue = result.issues[0];
    return { key, message: issue.message, path: issue.path };
  };
}

/** A rule between fields, run once the fields it reads have been checked by fieldFirst. */
export function fieldRule<T>(rule: (input: T) => { key: keyof T & string; message: string } | undefined): FieldStep {
  return (input) => rule(input as T);
}

/**
 * A schema followed by a rule over its checked value, reported at a path
 * inside it (["operations", "loadHighZ"], ["fields", 2]): for rules between
 * fields of different depths.
 */
export function withRule<S extends v.GenericSchema>(schema: S, rule: (value: v.InferOutput<S>) => { at: readonly (string | number)[]; message: string } | undefined) {
  return v.pipe(
    schema,
    v.rawCheck<v.InferOutput<S>>(({ dataset, addIssue }) => {
      if (!dataset.typed) return;
      const problem = rule(dataset.value);
      if (problem) addIssue({ message: problem.message, path: pathItems(dataset.value, problem.at) as [v.IssuePathItem, ...v.IssuePathItem[]] });
    }),
  );
}

function pathItems(root: unknown, keys: readonly (string | number)[]): v.IssuePathItem[] {
  let input = root as Record<string | number, unknown>;
  return keys.map((key) => {
    const value = input?.[key];
    const item = { type: typeof key === 'number' ? 'array' : 'object', origin: 'value', input, key, value } as v.IssuePathItem;
    input = value as Record<string | number, unknown>;
    return item;
  });
}

/** The first problem of a value against a schema: the field's path as text (`.amplitude.vpp`, `[2]`), the message and its hint. */
export interface FirstProblem {
  path: string;
  message: string;
  hint?: string;
}

/** Checks a value: the checked output, or the first problem found. */
export function checkOrProblem<S extends v.GenericSchema>(schema: S, value: unknown): { output: v.InferOutput<S> } | { problem: FirstProblem } {
  const result = v.safeParse(schema, value, { abortEarly: true, abortPipeEarly: true });
  if (result.success) return { output: result.output };
  const issue = result.issues[0];
  return { problem: { path: pathText(issue.path), ...splitHint(issue.message) } };
}

function pathText(path: readonly v.IssuePathItem[] | undefined): string {
  let text = '';
  for (const item of path ?? []) {
    if (item.origin === 'key') text += ' key';
    else if (typeof item.key === 'number') text += `[${item.key}]`;
    else text += `.${String(item.key).slice(0, 60)}`;
  }
  return text;
}

/** Leaves out the fields that are undefined or null (optional and not given). */
function dropAbsent(object: Record<string, unknown>): Record<string, unknown> {
  const result: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(object)) if (value !== undefined && value !== null) result[key] = value;
  return result;
}

/** An optional field: absent and null both mean "not given". */
export function optional<S extends v.GenericSchema>(schema: S) {
  return v.nullish(schema);
}

/** A field that must be given, with its own word for "missing" (what is needed, how to give it). */
export function required<S extends v.GenericSchema>(schema: S, missingMessage: string) {
  return v.pipe(
    v.custom<unknown>((input) => input !== undefined && input !== null, missingMessage),
    schema,
  );
}

/** An optional field with a default for absent or null. */
export function withDefault<S extends v.GenericSchema>(schema: S, value: v.InferOutput<S>) {
  return v.nullish(schema, value as never);
}

/**
 * The maximum stimulus a run was made under (Vpp), a field of both requests
 * (sweep and noise). It is the bench's setting: the service fills it in and
 * records it, and a caller may not pass its own.
 */
export const maxStimulusSetByService = optional(
  v.custom<number>(
    () => false,
    withHint('is set by the service from the bench setting, not by the caller', 'Set the maximum stimulus on the Bench view (setMaxStimulus).'),
  ),
);

/** The same field in a run's request as the service sends it back: the limit it recorded. */
export const maxStimulusRecorded = optional(positiveNumber('V peak-to-peak'));
