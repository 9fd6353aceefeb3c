import { describe, expect, it } from 'vitest';
import { UnsupportedSchemaError, validateAgainstSchema, type JsonSchema } from '../../../app/record/schema-validator';

// Expected behaviour: JSON Schema Validation draft 2020-12, §6.1–6.5 (type, enum,
// const, minimum, pattern, items, minItems/maxItems, required), Core §10.2 (oneOf/anyOf),
// §10.3.2.3 (additionalProperties), §8.2.3.1 ($ref).
const schema: JsonSchema = {
  $defs: { positive: { type: 'number', minimum: 0 } },
  type: 'object',
  required: ['kind', 'values'],
  additionalProperties: false,
  properties: {
    kind: { enum: ['ac', 'dc'] },
    version: { const: 1 },
    id: { type: 'integer' },
    hex: { type: 'string', pattern: '^[0-9a-f]{4}$' },
    values: { type: 'array', items: { $ref: '#/$defs/positive' }, minItems: 1, maxItems: 3 },
    choice: { oneOf: [{ type: 'string' }, { type: 'number' }] },
    either: { anyOf: [{ type: 'null' }, { type: 'boolean' }] },
    maybe: { type: ['object', 'null'], required: ['x'] },
  },
};

const paths = (value: unknown) => validateAgainstSchema(value, schema).map((p) => `${p.path} ${p.message}`);

describe('JSON Schema subset validator', () => {
  it('accepts a valid instance', () => {
    expect(paths({ kind: 'ac', version: 1, id: 3, hex: '0a1f', values: [0, 2.5], choice: 'x', either: null, maybe: null })).toEqual([]);
  });

  it.each([
    [{ kind: 'xx', values: [1] }, '/kind must be one of'],
    [{ kind: 'ac' }, ' is missing required property "values"'],
    [{ kind: 'ac', values: [1], extra: 1 }, '/extra no value is allowed here'],
    [{ kind: 'ac', values: [1], version: 2 }, '/version must be 1'],
    [{ kind: 'ac', values: [1], id: 1.5 }, '/id expected integer, found number'],
    [{ kind: 'ac', values: [1], hex: 'XYZ1' }, '/hex does not match'],
    [{ kind: 'ac', values: [-1] }, '/values/0 must be ≥ 0'],
    [{ kind: 'ac', values: [] }, '/values needs at least 1 items'],
    [{ kind: 'ac', values: [1, 2, 3, 4] }, '/values allows at most 3 items'],
    [{ kind: 'ac', values: [1], choice: true }, '/choice matches none of the allowed forms'],
    [{ kind: 'ac', values: [1], either: 3 }, '/either matches none of the allowed forms'],
    [{ kind: 'ac', values: [1], maybe: {} }, '/maybe is missing required property "x"'],
  ])('reports %j', (instance, expected) => {
    expect(paths(instance).some((line) => line.startsWith(expected))).toBe(true);
  });

  it('oneOf fails when two alternatives match', () => {
    const both: JsonSchema = { oneOf: [{ type: 'number' }, { type: 'integer' }] };
    expect(validateAgainstSchema(3, both)[0].message).toMatch(/exactly one/);
  });

  // Core §10.3.2.3 and Validation §6.5.3 speak of the instance's own members; a
  // name the object only inherits (constructor, toString) is not a property of it.
  it('treats inherited names such as "constructor" as absent: additionalProperties false refuses them, required is not met by them', () => {
    expect(paths(JSON.parse('{"kind":"ac","values":[1],"constructor":1}'))).toContain('/constructor no value is allowed here');
    expect(paths(JSON.parse('{"kind":"ac","values":[1],"toString":{}}'))).toContain('/toString no value is allowed here');
    const needsNames: JsonSchema = { type: 'object', required: ['constructor', 'toString'] };
    expect(validateAgainstSchema({}, needsNames).map((p) => p.message)).toEqual([
      'is missing required property "constructor"',
      'is missing required property "toString"',
    ]);
  });

  // Validation §6.1.2–6.1.3 with Core §4.2.2: two objects are equal when they
  // have the same members, whatever the order their keys were written in.
  it('compares enum and const by JSON equality, not by key order', () => {
    expect(validateAgainstSchema({ b: 2, a: 1 }, { const: { a: 1, b: 2 } })).toEqual([]);
    expect(validateAgainstSchema({ b: 2, a: 1 }, { enum: [{ a: 1, b: 2 }, 'other'] })).toEqual([]);
    expect(validateAgainstSchema({ a: 1, b: 3 }, { const: { a: 1, b: 2 } })).toHaveLength(1);
    expect(validateAgainstSchema([{ y: [1, { q: 1, p: 2 }], x: 0 }], { const: [{ x: 0, y: [1, { p: 2, q: 1 }] }] })).toEqual([]);
  });

  it('refuses keywords it does not implement instead of ignoring them', () => {
    expect(() => validateAgainstSchema('x', { type: 'string', maxLength: 3 })).toThrow(UnsupportedSchemaError);
  });
});
