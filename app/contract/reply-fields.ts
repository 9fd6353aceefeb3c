/**
 * Building blocks for what the service sends back (the results of its methods
 * and its events), as the window checks them where they arrive
 * (check-reply.ts). They say what each value is, as field-schemas.ts does for
 * what a caller sends, and differ from those in three ways:
 *
 * - A field the window does not know is let through: a newer host may add
 *   one without breaking an older window. A missing field, or a field of
 *   another kind, is refused.
 * - Measured and computed numbers may be NaN (no value: an overrange, a
 *   reading that does not apply, app/store/row-mapping.ts) or ±Infinity.
 *   Electron's IPC carries them as they are (structured clone); JSON (the web
 *   host, its event socket) has no such numbers and carries null instead
 *   (JSON.stringify). Both forms are accepted. Counts, indexes and ids are
 *   whole numbers on both.
 * - Nothing is transformed or limited in size: the checks only read, and the
 *   window goes on with the reply exactly as it arrived.
 *
 * Columns of thousands of numbers are checked by one loop each, not one
 * schema per element (test/bench/result-check.ts times it).
 */
import * as v from 'valibot';
import { describeValue, plainObject, withEveryKey } from './field-schemas';

/**
 * An object with the given fields (see above: unknown fields are let through,
 * a missing one is checked as undefined by its own schema, so it gets its own
 * field's message at its own path).
 */
export function replyObject<const E extends v.ObjectEntries>(entries: E) {
  return v.pipe(plainObject, withEveryKey(Object.keys(entries)), v.object(entries));
}

/** A field that may be absent (or undefined, which IPC keeps and JSON leaves out). */
export function absentOr<S extends v.GenericSchema>(schema: S) {
  return v.optional(schema);
}

/** A field that is null when it has no value. */
export function nullOr<S extends v.GenericSchema>(schema: S) {
  return v.nullable(schema);
}

export function listOf<S extends v.GenericSchema>(schema: S) {
  return v.array(schema, (issue) => `must be a list, got ${describeValue(issue.input)}`);
}

const isQuantity = (value: unknown): boolean => typeof value === 'number' || value === null;
const isCount = (value: unknown): boolean => Number.isInteger(value) && (value as number) >= 0;
const isText = (value: unknown): boolean => typeof value === 'string';

const QUANTITY = 'a number (null where it has none)';
const COUNT = 'a whole number from 0';

/** A measured or computed value: any number, NaN and ±Infinity included, or null (JSON's form of those). */
export const quantity = v.custom<number>(isQuantity, (issue) => `must be ${QUANTITY}, got ${describeValue(issue.input)}`);

/** A count, an index or bit flags: a whole number from 0. */
export const count = v.custom<number>(isCount, (issue) => `must be ${COUNT}, got ${describeValue(issue.input)}`);

/** A whole number of either sign (an instrument's SCPI error code, −113). */
export const integer = v.custom<number>(Number.isInteger, (issue) => `must be a whole number, got ${describeValue(issue.input)}`);

export const replyText = v.string((issue) => `must be text, got ${describeValue(issue.input)}`);

/** A moment as ISO 8601 text (the service writes them with Date.toISOString). */
export const instant = v.string((issue) => `must be a date and time (ISO 8601 text), got ${describeValue(issue.input)}`);

/** A list of values checked in one loop; the first item that is not `expected` is refused at its index. */
function column<T>(isItem: (value: unknown) => boolean, items: string, expected: string) {
  return v.pipe(
    v.custom<T[]>(Array.isArray, (issue) => `must be a list of ${items}, got ${describeValue(issue.input)}`),
    v.rawCheck<T[]>(({ dataset, addIssue }) => {
      if (!dataset.typed) return;
      const list = dataset.value as unknown[];
      for (let index = 0; index < list.length; index++) {
        if (isItem(list[index])) continue;
        const value = list[index];
        addIssue({ message: `must be ${expected}, got ${describeValue(value)}`, path: [{ type: 'array', origin: 'value', input: list, key: index, value }] });
        return;
      }
    }),
  );
}

/** A column of measured or computed values (see quantity). */
export const quantityColumn = column<number>(isQuantity, 'numbers', QUANTITY);
/** A column of counts, indexes or bit flags. */
export const countColumn = column<number>(isCount, 'whole numbers', COUNT);
export const textColumn = column<string>(isText, 'texts', 'text');

/**
 * An object whose fields are all optional and named by `keys` (a role's
 * address, a figure's difference): Partial<Record<K, output of S>>.
 */
export function someOf<const K extends string, S extends v.GenericSchema>(keys: readonly K[], schema: S) {
  const entries = Object.fromEntries(keys.map((key) => [key, v.optional(schema)])) as { [P in K]: v.OptionalSchema<S, undefined> };
  return replyObject(entries);
}

/**
 * What a method that resolves to nothing sends back: null, as both hosts carry
 * it (app/host/call-service.ts makes undefined null, which JSON and IPC carry
 * alike), or undefined.
 */
export const nothing = v.custom<undefined>((value) => value === null || value === undefined, (issue) => `must be nothing (null), got ${describeValue(issue.input)}`);
