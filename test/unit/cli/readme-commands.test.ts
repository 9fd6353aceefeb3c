/**
 * The README's command table is checked against the CLI's own command table
 * (app/cli/commands/index.ts): every command has a row, every `rolloff X` in
 * the table is a command, and every --option written beside it is one of that
 * command's options. So the table stays true when a command or option changes.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { COMMANDS } from '../../../app/cli/commands';
import { findCommand } from '../../../app/cli/args';

const README = readFileSync(new URL('../../../README.md', import.meta.url), 'utf8');

/** The rows of the table under "## Using it" (| job | command |). */
function commandTableRows(): string[] {
  const section = README.slice(README.indexOf('| job | command |'));
  const rows = section.split('\n').filter((line, index, lines) => line.startsWith('|') && lines.slice(0, index).every((l) => l.startsWith('|')));
  return rows.slice(2);
}

/** Each `rolloff NAME …` code span of a row with the options written in it, and in option-only spans after it. */
function commandsIn(row: string): Array<{ name: string; options: string[] }> {
  const found: Array<{ name: string; options: string[] }> = [];
  for (const [, span] of row.matchAll(/`([^`]+)`/g)) {
    const words = span.split(/\s+/);
    if (words[0] === 'rolloff') found.push({ name: words[1], options: [] });
    const current = found.at(-1);
    if (current) current.options.push(...words.filter((w) => w.startsWith('--')).map((w) => w.slice(2).replace(/[,;)]+$/, '')));
  }
  return found;
}

describe('README command table', () => {
  const rows = commandTableRows();
  const mentioned = rows.flatMap(commandsIn);

  it('has a row for every command the CLI has', () => {
    expect(rows.length).toBeGreaterThan(10);
    const named = new Set(mentioned.map((m) => m.name));
    expect(COMMANDS.map((c) => c.name).filter((name) => !named.has(name))).toEqual([]);
  });

  it('names only commands and options that exist', () => {
    const problems: string[] = [];
    for (const { name, options } of mentioned) {
      const command = findCommand(COMMANDS, name);
      if (!command) {
        problems.push(`rolloff ${name}: no such command`);
        continue;
      }
      const known = new Set(command.options.flatMap((o) => [o.name, ...(o.aliases ?? [])]));
      for (const option of options) if (!known.has(option) && option !== 'help') problems.push(`rolloff ${name} --${option}: no such option`);
    }
    expect(mentioned.length).toBeGreaterThan(20);
    expect(problems).toEqual([]);
  });
});
