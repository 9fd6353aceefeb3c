/**
 * Instrument-side parsing of a program message (IEEE 488.2 §7): units
 * separated by ';', each a header and optional comma-separated parameters,
 * with quoted strings kept whole. Simplification: every unit after ';' is
 * taken as rooted (no relative header paths), which the shipped profiles
 * never rely on.
 */
import { splitOutsideQuotes } from '../bench/template';

export interface ProgramUnit {
  header: string;
  params: string[];
}

export function splitProgramMessage(message: string): ProgramUnit[] {
  return splitOutsideQuotes(message, ';')
    .map((unit) => unit.trim())
    .filter((unit) => unit !== '')
    .map((unit) => {
      const space = unit.search(/\s/);
      if (space < 0) return { header: unit, params: [] };
      const rest = unit.slice(space + 1).trim();
      return { header: unit.slice(0, space), params: rest === '' ? [] : splitOutsideQuotes(rest, ',').map((p) => p.trim()) };
    });
}

/**
 * A compiled header pattern in the SCPI convention: upper-case letters are
 * the short form, the whole word the long form; `[...]` is an optional node;
 * `#` takes a numeric suffix; a trailing `?` makes it a query.
 * Example: "[SOURce]:VOLTage[:LEVel][:IMMediate][:AMPLitude]".
 */
export class HeaderPattern {
  private readonly regex: RegExp;
  readonly isQuery: boolean;

  constructor(readonly pattern: string) {
    this.isQuery = pattern.endsWith('?');
    const body = this.isQuery ? pattern.slice(0, -1) : pattern;
    let source = '^';
    for (const segment of body.match(/\[[^\]]+\]|[^[\]]+/g) ?? []) {
      const optional = segment.startsWith('[');
      const inner = optional ? segment.slice(1, -1) : segment;
      const nodes = inner.split(':').filter((n) => n !== '').map(compileKeyword).map((k) => `:${k}`).join('');
      source += optional ? `(?:${nodes})?` : nodes;
    }
    source += this.isQuery ? '\\?$' : '$';
    this.regex = new RegExp(source);
  }

  /** Numeric suffixes (1 when omitted) if the header matches, else undefined. */
  match(header: string): number[] | undefined {
    const normalized = (header.startsWith(':') ? header : `:${header}`).toUpperCase();
    const match = this.regex.exec(normalized);
    if (!match) return undefined;
    return match.slice(1).map((digits) => (digits === undefined || digits === '' ? 1 : Number(digits)));
  }
}

function compileKeyword(keyword: string): string {
  const suffix = keyword.endsWith('#');
  const word = suffix ? keyword.slice(0, -1) : keyword;
  const short = word.replace(/[a-z].*$/, '');
  const long = word.toUpperCase();
  const escape = (text: string) => text.replace(/[*]/g, '\\*');
  const alternatives = short === long ? escape(long) : `${escape(short)}|${escape(long)}`;
  return `(?:${alternatives})${suffix ? '(\\d*)' : ''}`;
}

/** Whether a parameter is the keyword in short or long form, e.g. keywordIs("SIN", "SINusoid"). */
export function keywordIs(param: string, keyword: string): boolean {
  const upper = param.trim().toUpperCase();
  const short = keyword.replace(/[a-z].*$/, '');
  return upper === short || upper === keyword.toUpperCase();
}
