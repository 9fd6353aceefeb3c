/**
 * Checks a JSON record against record.schema.json (JSON Schema draft 2020-12)
 * with @cfworker/json-schema: a maintained validator of the whole draft that
 * interprets the schema (no eval or new Function), so it runs in the window as
 * in Node. This file only words its findings for a reader, as JSON Pointers
 * (RFC 6901) into the record with a short message.
 *
 * The schema may use only the keywords listed in SUPPORTED: a misspelt or
 * untried keyword is refused rather than ignored, so the schema cannot
 * silently say less than it seems to.
 */
import { Validator, type OutputUnit, type Schema } from '@cfworker/json-schema';

export type JsonSchema = boolean | { [keyword: string]: unknown };

const ANNOTATIONS = new Set(['$schema', '$id', 'title', 'description', '$comment']);
const SUPPORTED = new Set([
  'type', 'enum', 'const', 'properties', 'required', 'additionalProperties', 'items', 'minItems', 'maxItems',
  'minimum', 'pattern', 'oneOf', 'anyOf', '$ref', '$defs',
]);
/** Keywords that only report that something below them failed; the failure itself is reported too. */
const WRAPPERS = new Set(['properties', 'additionalProperties', 'items', '$ref']);

export interface SchemaProblem {
  /** JSON Pointer (RFC 6901) into the instance. */
  path: string;
  message: string;
}

export class UnsupportedSchemaError extends Error {}

const validators = new WeakMap<object, Validator>();

export function validateAgainstSchema(instance: unknown, rootSchema: JsonSchema): SchemaProblem[] {
  if (typeof rootSchema === 'boolean') return rootSchema ? [] : [{ path: '', message: 'no value is allowed here' }];
  let validator = validators.get(rootSchema);
  if (!validator) {
    refuseUnsupportedKeywords(rootSchema, '');
    validator = new Validator(rootSchema as Schema, '2020-12', false);
    validators.set(rootSchema, validator);
  }
  const result = validator.validate(instance);
  if (result.valid) return [];
  const context: Context = { root: rootSchema, instance, all: result.errors, answered: new Set() };
  return nearestAlternatives(result.errors, context).flatMap((unit) => problemsOf(unit, context));
}

function refuseUnsupportedKeywords(schema: unknown, path: string): void {
  if (typeof schema === 'boolean') return;
  if (typeof schema !== 'object' || schema === null) throw new UnsupportedSchemaError(`schema at ${path || '/'} is not an object or boolean`);
  for (const [keyword, value] of Object.entries(schema)) {
    if (ANNOTATIONS.has(keyword)) continue;
    if (!SUPPORTED.has(keyword)) throw new UnsupportedSchemaError(`schema keyword "${keyword}" at ${path || '/'} is not supported`);
    const at = `${path}/${keyword}`;
    if (keyword === 'properties' || keyword === '$defs') for (const [name, child] of Object.entries(value as object)) refuseUnsupportedKeywords(child, `${at}/${name}`);
    else if (keyword === 'oneOf' || keyword === 'anyOf') (value as unknown[]).forEach((child, i) => refuseUnsupportedKeywords(child, `${at}/${i}`));
    else if (keyword === 'items' || keyword === 'additionalProperties') refuseUnsupportedKeywords(value, at);
  }
}

/**
 * Where no alternative of a oneOf/anyOf matches, keeps only the findings of
 * the alternative that came nearest (fewest findings), so the message points
 * at the real fault rather than at every form the value was not meant to be.
 */
function nearestAlternatives(units: OutputUnit[], context: Context): OutputUnit[] {
  const root = context.root;
  let kept = units;
  const choices = units.filter((u) => u.keyword === 'oneOf' || u.keyword === 'anyOf').sort((a, b) => a.keywordLocation.length - b.keywordLocation.length);
  for (const choice of choices) {
    if (!kept.includes(choice)) continue;
    const prefix = `${choice.keywordLocation}/`;
    const groups = new Map<string, OutputUnit[]>();
    for (const unit of kept) {
      if (!unit.keywordLocation.startsWith(prefix)) continue;
      const index = unit.keywordLocation.slice(prefix.length).split('/')[0];
      groups.set(index, [...(groups.get(index) ?? []), unit]);
    }
    if (groups.size < (schemaAt(root, choice.keywordLocation) as unknown[]).length) {
      // Some alternatives matched (a oneOf with several matches): their detail is not the fault.
      kept = kept.filter((u) => !u.keywordLocation.startsWith(prefix));
      continue;
    }
    const count = (group: OutputUnit[]) => group.flatMap((u) => problemsOf(u, { ...context, answered: new Set() })).length;
    const nearest = [...groups.values()].reduce((best, group) => (count(group) < count(best) ? group : best));
    kept = kept.filter((u) => !u.keywordLocation.startsWith(prefix) || nearest.includes(u));
  }
  return kept;
}

interface Context {
  root: JsonSchema;
  instance: unknown;
  /** Every finding of the validator, for counting the alternatives that failed. */
  all: OutputUnit[];
  /** `required` findings already worded (the validator reports one per missing name). */
  answered: Set<string>;
}

function problemsOf(unit: OutputUnit, { root, instance, all, answered }: Context): SchemaProblem[] {
  if (WRAPPERS.has(unit.keyword)) return [];
  const path = decodeURI(unit.instanceLocation.replace(/^#/, ''));
  const value = valueAt(instance, path);
  if (unit.keyword === 'false') return [{ path, message: 'no value is allowed here' }];
  const rule = schemaAt(root, unit.keywordLocation);
  switch (unit.keyword) {
    case 'type': {
      const types = Array.isArray(rule) ? (rule as string[]) : [rule as string];
      return [{ path, message: `expected ${types.join(' or ')}, found ${typeOf(value)}` }];
    }
    case 'const':
      return [{ path, message: `must be ${JSON.stringify(rule)}` }];
    case 'enum':
      return [{ path, message: `must be one of ${(rule as unknown[]).map((e) => JSON.stringify(e)).join(', ')}` }];
    case 'minimum':
      return [{ path, message: `must be ≥ ${rule}` }];
    case 'pattern':
      return [{ path, message: `does not match ${rule}` }];
    case 'minItems':
      return [{ path, message: `needs at least ${rule} items` }];
    case 'maxItems':
      return [{ path, message: `allows at most ${rule} items` }];
    case 'required': {
      // Own properties only: an inherited name such as "constructor" does not count as present.
      const key = `${path}|${unit.keywordLocation}`;
      if (answered.has(key)) return [];
      answered.add(key);
      const missing = (rule as string[]).filter((name) => !Object.prototype.hasOwnProperty.call(value, name));
      return missing.map((name) => ({ path, message: `is missing required property "${name}"` }));
    }
    case 'oneOf': {
      const prefix = `${unit.keywordLocation}/`;
      const failing = new Set(all.filter((u) => u.keywordLocation.startsWith(prefix)).map((u) => u.keywordLocation.slice(prefix.length).split('/')[0]));
      const passing = (rule as unknown[]).length - failing.size;
      return [{ path, message: passing === 0 ? 'matches none of the allowed forms' : `matches ${passing} forms where exactly one is allowed` }];
    }
    case 'anyOf':
      return [{ path, message: 'matches none of the allowed forms' }];
    default:
      return [{ path, message: unit.error }];
  }
}

function typeOf(value: unknown): string {
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'array';
  if (typeof value === 'number') return Number.isInteger(value) ? 'integer' : 'number';
  return typeof value;
}

function unescapeSegment(segment: string): string {
  return segment.replace(/~1/g, '/').replace(/~0/g, '~');
}

function valueAt(instance: unknown, pointer: string): unknown {
  let node = instance;
  for (const segment of pointer.split('/').slice(1)) node = (node as Record<string, unknown>)?.[unescapeSegment(segment)];
  return node;
}

/** The schema value at a keyword location, following local "$ref" steps as the validator did. */
function schemaAt(root: JsonSchema, keywordLocation: string): unknown {
  let node: unknown = root;
  for (const segment of decodeURI(keywordLocation.replace(/^#/, '')).split('/').slice(1)) {
    const key = unescapeSegment(segment);
    node = key === '$ref' ? valueAt(root, String((node as Record<string, unknown>).$ref).replace(/^#/, '')) : (node as Record<string, unknown>)?.[key];
  }
  return node;
}
