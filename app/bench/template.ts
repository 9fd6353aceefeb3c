/**
 * Profile command templates: SCPI text with `{name}` placeholders filled from
 * numbers. This file is the one place that formats numbers for SCPI program
 * data and checks template syntax.
 */

const PLACEHOLDER = /\{([A-Za-z][A-Za-z0-9]*)\}/g;

/** Placeholder names used in a template, or a description of what is wrong with it. */
export function templatePlaceholders(template: string): { names: string[] } | { problem: string } {
  if (template.trim() === '') return { problem: 'is empty' };
  if (/[\r\n]/.test(template)) return { problem: 'contains a line break' };
  const names = [...template.matchAll(PLACEHOLDER)].map((m) => m[1]);
  const leftover = template.replace(PLACEHOLDER, '');
  if (/[{}]/.test(leftover)) return { problem: `has an unmatched or malformed brace in "${template}"` };
  return { names };
}

/**
 * Decimal numeric program data (IEEE 488.2 §7.7.2, recalled from memory):
 * plain or exponent form, 12 significant digits so a frequency round-trips.
 */
export function formatScpiNumber(value: number): string {
  if (!Number.isFinite(value)) throw new RangeError(`cannot send ${value} to an instrument`);
  if (Number.isInteger(value) && Math.abs(value) < 1e15) return String(value);
  return String(Number(value.toPrecision(12)));
}

export function fillTemplate(template: string, values: Record<string, number>): string {
  return template.replace(PLACEHOLDER, (_, name: string) => {
    const value = values[name];
    if (value === undefined) throw new RangeError(`template "${template}" needs {${name}}`);
    return formatScpiNumber(value);
  });
}

/**
 * A command is a query when the header (before the first space) of any of its
 * program message units (separated by ';' outside quotes) ends in '?': the
 * message then has a response.
 */
export function isQuery(command: string): boolean {
  return splitOutsideQuotes(command, ';').some((unit) => unit.trim().split(/\s+/)[0].endsWith('?'));
}

/** Splits at `separator` where it is not inside a '…' or "…" string; the quotes stay in the parts. */
export function splitOutsideQuotes(text: string, separator: string): string[] {
  const parts: string[] = [];
  let current = '';
  let quote: string | undefined;
  for (const char of text) {
    if (quote) {
      if (char === quote) quote = undefined;
    } else if (char === '"' || char === "'") {
      quote = char;
    } else if (char === separator) {
      parts.push(current);
      current = '';
      continue;
    }
    current += char;
  }
  parts.push(current);
  return parts;
}
