/**
 * Old option and command names stay accepted for one release but never show
 * in help (the renames from "virtual bench" to "simulated bench" and from
 * `probe` to `identify`). Expected behaviour: the project's own rule in
 * app/cli/args.ts, no outside source.
 */
import { describe, expect, it } from 'vitest';
import { findCommand, formatCommandHelp, parseArgs, type OptionSpec } from '../../../app/cli/args';
import { COMMANDS } from '../../../app/cli/commands';

const SPECS: OptionSpec[] = [{ name: 'simulated', kind: 'flag', aliases: ['virtual'], description: 'use the simulated bench' }];

describe('option and command aliases', () => {
  it('reads an old option name as the new one', () => {
    expect(parseArgs(['--virtual'], SPECS).options).toEqual({ simulated: true });
    expect(parseArgs(['--simulated'], SPECS).options).toEqual({ simulated: true });
  });

  it('finds a command by its old name and lists only the new one in help', () => {
    expect(findCommand(COMMANDS, 'probe')?.name).toBe('identify');
    expect(findCommand(COMMANDS, 'identify')?.name).toBe('identify');
    expect(findCommand(COMMANDS, 'no-such-command')).toBeUndefined();
    const sweep = findCommand(COMMANDS, 'sweep')!;
    const help = formatCommandHelp(sweep);
    expect(help).toMatch(/--simulated/);
    expect(help).not.toMatch(/--virtual/);
  });
});
