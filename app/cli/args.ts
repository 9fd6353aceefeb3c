/**
 * Command-line argument parsing shared by every command. Options are declared
 * per command so `--help` is generated from the same table that validates them.
 */
import { ValidationError } from '../errors';
import { parseEngineering } from '../units';

export type OptionKind = 'flag' | 'string' | 'number' | 'integer';

export interface OptionSpec {
  /** Long name without dashes, e.g. "per-decade". */
  name: string;
  kind: OptionKind;
  description: string;
  /** Shown in help and used when the option is absent. */
  defaultValue?: string | number | boolean;
  /** Placeholder in help, e.g. "HZ". */
  placeholder?: string;
  /** May be given more than once (values collected in order). */
  repeatable?: boolean;
  /** Old names still accepted for one release; never shown in help. */
  aliases?: string[];
}

export interface CommandSpec {
  name: string;
  /** Old command names still accepted for one release; never listed in help. */
  aliases?: string[];
  summary: string;
  /** Usage line after `rolloff NAME`, e.g. "DESIGN.json [options]". */
  usage: string;
  options: OptionSpec[];
  /** Extra paragraphs for --help (examples, notes). */
  details?: string;
  run(parsed: ParsedArgs): Promise<number>;
}

export interface ParsedArgs {
  positionals: string[];
  options: Record<string, string | number | boolean | Array<string | number> | undefined>;
}

/** Parses argv for one command. Numbers accept engineering notation (`--from 1m`). */
export function parseArgs(argv: string[], specs: OptionSpec[]): ParsedArgs {
  const byName = new Map(specs.flatMap((spec) => [spec.name, ...(spec.aliases ?? [])].map((name) => [name, spec] as const)));
  const positionals: string[] = [];
  const options: ParsedArgs['options'] = {};
  for (let i = 0; i < argv.length; i++) {
    const token = argv[i];
    if (token === '--') {
      positionals.push(...argv.slice(i + 1));
      break;
    }
    if (!token.startsWith('--')) {
      positionals.push(token);
      continue;
    }
    const [rawName, inlineValue] = splitOnce(token.slice(2), '=');
    const spec = byName.get(rawName);
    if (!spec) {
      const known = specs.map((s) => `--${s.name}`).join(', ') || 'none';
      throw new ValidationError(`--${rawName}`, 'unknown option', `Options for this command: ${known}.`);
    }
    let value: string | number | boolean;
    if (spec.kind === 'flag') {
      if (inlineValue !== undefined) throw new ValidationError(`--${spec.name}`, 'takes no value');
      value = true;
    } else {
      const text = inlineValue ?? argv[++i];
      if (text === undefined) throw new ValidationError(`--${spec.name}`, `needs a value (${spec.placeholder ?? spec.kind})`);
      value = convert(spec, text);
    }
    if (spec.repeatable) {
      const list = (options[spec.name] as Array<string | number> | undefined) ?? [];
      list.push(value as string | number);
      options[spec.name] = list;
    } else {
      options[spec.name] = value;
    }
  }
  for (const spec of specs) {
    if (options[spec.name] === undefined && spec.defaultValue !== undefined) options[spec.name] = spec.defaultValue;
  }
  return { positionals, options };
}

function convert(spec: OptionSpec, text: string): string | number {
  if (spec.kind === 'string') return text;
  const value = parseEngineering(text, `--${spec.name}`);
  if (spec.kind === 'integer' && !Number.isInteger(value)) {
    throw new ValidationError(`--${spec.name}`, `"${text}" is not a whole number`);
  }
  return value;
}

function splitOnce(text: string, separator: string): [string, string | undefined] {
  const at = text.indexOf(separator);
  return at < 0 ? [text, undefined] : [text.slice(0, at), text.slice(at + 1)];
}

/** Help text for one command, built from its spec. */
export function formatCommandHelp(spec: CommandSpec): string {
  const lines = [`rolloff ${spec.name} ${spec.usage}`.trimEnd(), '', spec.summary, ''];
  if (spec.options.length > 0) {
    lines.push('Options:');
    const rows = spec.options.map((o) => {
      const left = `  --${o.name}${o.kind === 'flag' ? '' : ' ' + (o.placeholder ?? o.kind.toUpperCase())}`;
      const extra = o.defaultValue !== undefined && o.defaultValue !== '' && o.kind !== 'flag' ? ` (default ${o.defaultValue})` : '';
      return [left, o.description + extra] as const;
    });
    const width = Math.max(...rows.map(([left]) => left.length)) + 2;
    for (const [left, right] of rows) lines.push(left.padEnd(width) + right);
    lines.push('');
  }
  lines.push('  --help'.padEnd(10) + 'show this help');
  if (spec.details) lines.push('', spec.details.trim());
  return lines.join('\n') + '\n';
}

/** The command called NAME, or by one of its old names. */
export function findCommand(commands: CommandSpec[], name: string | undefined): CommandSpec | undefined {
  return commands.find((c) => c.name === name || (name !== undefined && c.aliases?.includes(name)));
}

/** Typed accessors so commands do not repeat casts. */
export function optionNumber(parsed: ParsedArgs, name: string): number | undefined {
  const value = parsed.options[name];
  return typeof value === 'number' ? value : undefined;
}

export function optionString(parsed: ParsedArgs, name: string): string | undefined {
  const value = parsed.options[name];
  return typeof value === 'string' ? value : undefined;
}

export function optionFlag(parsed: ParsedArgs, name: string): boolean {
  return parsed.options[name] === true;
}

export function requirePositional(parsed: ParsedArgs, index: number, what: string): string {
  const value = parsed.positionals[index];
  if (value === undefined) throw new ValidationError(what, 'is missing', `Give ${what} as argument ${index + 1}.`);
  return value;
}
