import { describe, expect, it } from 'vitest';
import { canonicalJson } from '../../../app/record/canonical-json';
import { ValidationError } from '../../../app/errors';

describe('canonical JSON (RFC 8785)', () => {
  it('sorts keys by UTF-16 code units (RFC 8785 §3.2.3 sorting example, recalled from memory)', () => {
    const input = { '\u20ac': 'Euro Sign', '\r': 'Carriage Return', '\ufb33': 'Hebrew Letter Dalet With Dagesh', '1': 'One', '\ud83d\ude00': 'Emoji: Grinning Face', '\u0080': 'Control', '\u00f6': 'Latin Small Letter O With Diaeresis' };
    // Read the order from the text: JSON.parse would reorder integer-like keys such as "1".
    const text = canonicalJson(input);
    const order = Object.values(input).sort((a, b) => text.indexOf(JSON.stringify(a)) - text.indexOf(JSON.stringify(b)));
    expect(order).toEqual(['Carriage Return', 'One', 'Control', 'Latin Small Letter O With Diaeresis', 'Euro Sign', 'Emoji: Grinning Face', 'Hebrew Letter Dalet With Dagesh']);
    expect(text.startsWith('{"\\r":"Carriage Return","1":"One",')).toBe(true);
  });

  it('writes numbers in ECMAScript shortest form (RFC 8785 §3.2.2.3 and Appendix B examples, recalled from memory)', () => {
    expect(canonicalJson([0, -0, 1e21, 1e-7, 0.000001, 333333333.33333329, 4.5, 1e23])).toBe('[0,0,1e+21,1e-7,0.000001,333333333.3333333,4.5,1e+23]');
  });

  it('has no whitespace and keeps nesting and literals', () => {
    expect(canonicalJson({ b: [true, null, 'x"y'], a: { d: 1, c: 2 } })).toBe('{"a":{"c":2,"d":1},"b":[true,null,"x\\"y"]}');
  });

  it('refuses non-finite numbers, naming where they are', () => {
    expect(() => canonicalJson({ points: [1, Number.NaN] }, 'record')).toThrow(ValidationError);
    expect(() => canonicalJson({ points: [1, Number.NaN] }, 'record')).toThrow(/record\.points\[1\]/);
  });
});
