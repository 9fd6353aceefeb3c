/**
 * A validator for the subset of JSON Schema draft 2020-12 that record.schema.json
 * uses: type, enum, const, properties, required, additionalProperties, items,
 * minItems, maxItems, minimum, pattern, oneOf, anyOf, $ref to "#/$defs/…",
 * and boolean schemas. Any other keyword is refused rather than ignored, so the
 * schema cannot silently say more than is checked. Semantics follow JSON Schema
 * Validation 2020-12 §6 (e.g. `required` applies only when the instance is an object).
 */

export type JsonSchema = boolean | { [keyword: string]: unknown };

const ANNOTATIONS = new Set(['$schema', '$id', 'title', 'description', '$comment']);
const SUPPORTED = new Set([
  'type', 'enum', 'const', 'properties', 'required', 'additionalProperties', 'items', 'minItems', 'maxItems',
  'minimum', 'pattern', 'oneOf', 'anyOf', '$ref', '$defs',
]);

export interface SchemaProblem {
  /** JSON Pointer (RFC 6901) into the instance. */
  path: string;
  message: string;
}

export class UnsupportedSchemaError extends Error {}

function typeOf(value: unknown): string {
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'array';
  if (typeof value === 'number') return Number.isInteger(value) ? 'integer' : 'number';
  return typeof value;
}

function matchesType(value: unknown, type: string): boolean {
  const actual = typeOf(value);
  return actual === type || (type === 'number' && actual === 'integer');
}

function deepEqual(a: unknown, b: unknown): boolean {
  return JSON.stringify(a) === JSON.stringify(b);
}

function pointerSegment(key: string | number): string {
  return String(key).replace(/~/g, '~0').replace(/\//g, '~1');
}

export function validateAgainstSchema(instance: unknown, rootSchema: JsonSchema): SchemaProblem[] {
  const problems: SchemaProblem[] = [];
  const patterns = new Map<string, RegExp>();

  const resolveRef = (ref: string): JsonSchema => {
    if (!ref.startsWith('#/')) throw new UnsupportedSchemaError(`only local "#/…" references are supported, not ${ref}`);
    let node: unknown = rootSchema;
    for (const part of ref.slice(2).split('/')) {
      node = (node as Record<string, unknown>)?.[part.replace(/~1/g, '/').replace(/~0/g, '~')];
      if (node === undefined) throw new UnsupportedSchemaError(`reference ${ref} does not resolve`);
    }
    return node as JsonSchema;
  };

  const check = (value: unknown, schema: JsonSchema, path: string, out: SchemaProblem[]): void => {
    if (schema === true) return;
    if (schema === false) {
      out.push({ path, message: 'no value is allowed here' });
      return;
    }
    for (const keyword of Object.keys(schema)) {
      if (!SUPPORTED.has(keyword) && !ANNOTATIONS.has(keyword)) throw new UnsupportedSchemaError(`schema keyword "${keyword}" at ${path || '/'} is not supported`);
    }
    const s = schema as Record<string, unknown>;
    if (s.$ref !== undefined) check(value, resolveRef(String(s.$ref)), path, out);
    if (s.type !== undefined) {
      const types = Array.isArray(s.type) ? (s.type as string[]) : [s.type as string];
      if (!types.some((t) => matchesType(value, t))) {
        out.push({ path, message: `expected ${types.join(' or ')}, found ${typeOf(value)}` });
        return;
      }
    }
    if (s.const !== undefined && !deepEqual(value, s.const)) out.push({ path, message: `must be ${JSON.stringify(s.const)}` });
    if (Array.isArray(s.enum) && !s.enum.some((option) => deepEqual(option, value))) {
      out.push({ path, message: `must be one of ${s.enum.map((e) => JSON.stringify(e)).join(', ')}` });
    }
    if (typeof value === 'number' && typeof s.minimum === 'number' && value < s.minimum) out.push({ path, message: `must be ≥ ${s.minimum}` });
    if (typeof value === 'string' && typeof s.pattern === 'string') {
      let regex = patterns.get(s.pattern);
      if (!regex) patterns.set(s.pattern, (regex = new RegExp(s.pattern, 'u')));
      if (!regex.test(value)) out.push({ path, message: `does not match ${s.pattern}` });
    }
    if (Array.isArray(value)) {
      if (typeof s.minItems === 'number' && value.length < s.minItems) out.push({ path, message: `needs at least ${s.minItems} items` });
      if (typeof s.maxItems === 'number' && value.length > s.maxItems) out.push({ path, message: `allows at most ${s.maxItems} items` });
      if (s.items !== undefined) value.forEach((item, i) => check(item, s.items as JsonSchema, `${path}/${i}`, out));
    }
    if (value !== null && typeof value === 'object' && !Array.isArray(value)) {
      const object = value as Record<string, unknown>;
      const properties = (s.properties ?? {}) as Record<string, JsonSchema>;
      for (const name of (s.required as string[] | undefined) ?? []) {
        if (!(name in object)) out.push({ path, message: `is missing required property "${name}"` });
      }
      for (const [name, propertyValue] of Object.entries(object)) {
        const childPath = `${path}/${pointerSegment(name)}`;
        if (name in properties) check(propertyValue, properties[name], childPath, out);
        else if (s.additionalProperties !== undefined) check(propertyValue, s.additionalProperties as JsonSchema, childPath, out);
      }
    }
    for (const keyword of ['oneOf', 'anyOf'] as const) {
      const options = s[keyword] as JsonSchema[] | undefined;
      if (!options) continue;
      const results = options.map((option) => {
        const local: SchemaProblem[] = [];
        check(value, option, path, local);
        return local;
      });
      const passing = results.filter((r) => r.length === 0).length;
      if (keyword === 'anyOf' && passing === 0) out.push({ path, message: 'matches none of the allowed forms' }, ...closest(results));
      if (keyword === 'oneOf' && passing !== 1) {
        out.push({ path, message: passing === 0 ? 'matches none of the allowed forms' : `matches ${passing} forms where exactly one is allowed` });
        if (passing === 0) out.push(...closest(results));
      }
    }
  };

  check(instance, rootSchema, '', problems);
  return problems;
}

/** The problems of the alternative that came nearest, so the message points at the real fault. */
function closest(results: SchemaProblem[][]): SchemaProblem[] {
  return results.reduce((best, r) => (r.length < best.length ? r : best), results[0] ?? []).slice(0, 5);
}
