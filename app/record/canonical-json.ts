/**
 * Canonical JSON per RFC 8785 (JSON Canonicalization Scheme) for the values a
 * record holds: object keys sorted by UTF-16 code units, no whitespace, numbers
 * in ECMAScript shortest round-trip form (RFC 8785 §3.2.2.3 adopts exactly
 * that), strings escaped as JSON.stringify does (RFC 8785 §3.2.2.2 likewise).
 * The same bytes come out in any JavaScript engine, so anyone can recompute a digest.
 */
import { ValidationError } from '../errors';

export function canonicalJson(value: unknown, where = 'value'): string {
  if (value === null) return 'null';
  switch (typeof value) {
    case 'boolean':
      return value ? 'true' : 'false';
    case 'string':
      return JSON.stringify(value);
    case 'number':
      if (!Number.isFinite(value)) {
        throw new ValidationError(where, `${value} cannot be written in canonical JSON`, 'Non-finite numbers are stored as null in records.');
      }
      return JSON.stringify(value); // -0 becomes "0", as RFC 8785 requires
    case 'object': {
      if (Array.isArray(value)) return `[${value.map((item, i) => canonicalJson(item, `${where}[${i}]`)).join(',')}]`;
      const entries = Object.entries(value as Record<string, unknown>).filter(([, v]) => v !== undefined);
      // Default sort compares UTF-16 code units, which is what RFC 8785 §3.2.3 asks for.
      entries.sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
      return `{${entries.map(([key, v]) => `${JSON.stringify(key)}:${canonicalJson(v, `${where}.${key}`)}`).join(',')}}`;
    }
    default:
      throw new ValidationError(where, `a ${typeof value} cannot be written in canonical JSON`);
  }
}
