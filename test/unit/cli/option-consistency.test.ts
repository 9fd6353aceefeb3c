/**
 * One option, one meaning: every command's option list is walked, and an option
 * name that means two things, a second name for one thing, or a default that
 * differs between commands fails. The rules are the project's own (common
 * practice, no source); the names come from app/cli/common-options.ts,
 * app/cli/design-option.ts and the vocabulary table.
 */
import { describe, expect, it } from 'vitest';
import { COMMANDS } from '../../../app/cli/commands';
import { formatCommandHelp, parseArgs, type CommandSpec, type OptionSpec } from '../../../app/cli/args';
import { DESIGN_PLACEHOLDER } from '../../../app/cli/design-option';
import { SETTINGS } from '../../../app/contract/vocabulary';
import { SIMULATED_BENCH_DEFAULTS } from '../../../app/sim';
import { NOISE_RUN_MEASUREMENT_NOISE_VRMS } from '../../../app/cli/commands/noise';
import { TOLERANCE_BAND_SETTINGS } from '../../../app/circuit';

const uses = COMMANDS.flatMap((command) => command.options.map((option) => ({ command, option })));

/**
 * The one default that differs on purpose: a noise run's simulated bench adds no flat noise unless
 * asked for, since the run measures the circuit's own (app/cli/commands/noise.ts says why).
 */
const DELIBERATE_DEFAULTS = [{ command: 'noise', option: 'measurement-noise', defaultValue: NOISE_RUN_MEASUREMENT_NOISE_VRMS }];
const deliberate = (u: { command: CommandSpec; option: OptionSpec }) =>
  DELIBERATE_DEFAULTS.some((d) => d.command === u.command.name && d.option === u.option.name && d.defaultValue === u.option.defaultValue);

function withOption(name: string): Array<{ command: CommandSpec; option: OptionSpec }> {
  return uses.filter((u) => u.option.name === name);
}

describe('command options', () => {
  it('an option name has one kind, one placeholder and one default in every command', () => {
    const problems: string[] = [];
    for (const name of new Set(uses.map((u) => u.option.name))) {
      const all = withOption(name);
      const [first] = all;
      for (const { command, option } of all.slice(1)) {
        if (option.kind !== first.option.kind) problems.push(`--${name}: ${option.kind} in ${command.name}, ${first.option.kind} in ${first.command.name}`);
        if (option.placeholder !== first.option.placeholder) problems.push(`--${name}: ${option.placeholder} in ${command.name}, ${first.option.placeholder} in ${first.command.name}`);
      }
      const defaults = all.filter((u) => u.option.defaultValue !== undefined && !deliberate(u));
      for (const { command, option } of defaults.slice(1)) {
        if (option.defaultValue !== defaults[0].option.defaultValue) problems.push(`--${name}: default ${option.defaultValue} in ${command.name}, ${defaults[0].option.defaultValue} in ${defaults[0].command.name}`);
      }
    }
    expect(uses.length).toBeGreaterThan(100);
    expect(problems).toEqual([]);
  });

  it('an old name kept for scripts is no other option\'s name, and no command has two options of one name', () => {
    const names = new Set(uses.map((u) => u.option.name));
    const problems: string[] = [];
    for (const command of COMMANDS) {
      const seen = new Set<string>();
      for (const option of command.options) {
        for (const name of [option.name, ...(option.aliases ?? [])]) {
          if (seen.has(name)) problems.push(`${command.name}: --${name} twice`);
          seen.add(name);
        }
        for (const alias of option.aliases ?? []) if (names.has(alias)) problems.push(`${command.name}: old name --${alias} of --${option.name} is another option elsewhere`);
      }
    }
    expect(problems).toEqual([]);
  });

  it('a TCP port is --port PORT everywhere (the simulated bench and the window alike)', () => {
    const ports = uses.filter((u) => u.option.placeholder === 'PORT' || u.option.name === 'port');
    expect(ports.map((u) => u.command.name).sort()).toEqual(['serve', 'sim']);
    for (const { command, option } of ports) expect([command.name, option.name, option.placeholder, option.kind]).toEqual([command.name, 'port', 'PORT', 'integer']);
    expect(withOption('tcp')).toEqual([]);
  });

  it('a design is given the same way everywhere: a stored id or a file', () => {
    const designs = withOption('design');
    expect(designs.map((u) => u.command.name).sort()).toEqual(['build', 'noise', 'schedule', 'sim', 'sweep']);
    for (const { option } of designs) expect([option.kind, option.placeholder]).toEqual(['string', DESIGN_PLACEHOLDER]);
    // The usage line says the same as the option list.
    for (const { command } of designs) if (command.usage.includes('--design')) expect(command.usage, command.name).toContain(`--design ${DESIGN_PLACEHOLDER}`);
    const theory = COMMANDS.find((c) => c.name === 'theory')!;
    expect(theory.usage.startsWith(DESIGN_PLACEHOLDER)).toBe(true);
  });

  it('the simulated bench runs at one speed and one noise unless told otherwise, with one speed option', () => {
    expect(withOption('fast')).toEqual([]);
    const simulatedBenchCommands = COMMANDS.filter((c) => c.options.some((o) => o.name === 'simulated') || c.name === 'sim' || c.name === 'demo');
    expect(simulatedBenchCommands.map((c) => c.name).sort()).toEqual(['demo', 'noise', 'resume', 'schedule', 'serve', 'sim', 'sweep']);
    for (const command of simulatedBenchCommands) {
      expect(command.options.find((o) => o.name === 'time-scale')?.defaultValue, command.name).toBe(SIMULATED_BENCH_DEFAULTS.timeScale);
      const measurementNoise = command.options.find((o) => o.name === 'measurement-noise');
      if (command.name === 'demo') continue;
      expect(measurementNoise?.defaultValue, command.name).toBe(deliberate({ command, option: measurementNoise! }) ? 0 : SIMULATED_BENCH_DEFAULTS.measurementNoiseVrms);
      expect(command.options.some((o) => o.name === 'circuit-noise'), command.name).toBe(true);
    }
  });

  it('the maximum stimulus has the table\'s option name and label everywhere it is set', () => {
    const limits = withOption(SETTINGS.maxStimulus.cliOption);
    expect(limits.length).toBeGreaterThanOrEqual(5);
    for (const { command, option } of limits) {
      expect(option.description.startsWith(SETTINGS.maxStimulus.label), command.name).toBe(true);
      expect(option.description, command.name).toContain(SETTINGS.maxStimulus.explanation);
    }
  });

  it('the maximum stimulus\'s old name --max-amplitude is still accepted but never shown in help', () => {
    const limits = withOption(SETTINGS.maxStimulus.cliOption);
    for (const { command, option } of limits) {
      expect(option.aliases, command.name).toEqual([...SETTINGS.maxStimulus.cliAliases]);
      expect(parseArgs(['--max-amplitude', '2'], command.options).options[SETTINGS.maxStimulus.cliOption], command.name).toBe(2);
      expect(formatCommandHelp(command), command.name).not.toContain('max-amplitude');
      expect(formatCommandHelp(command), command.name).toContain(`--${SETTINGS.maxStimulus.cliOption} VPP`);
    }
  });

  it('a sweep\'s range and the tolerance band state one default in one notation on every command', () => {
    for (const name of ['from', 'to', 'per-decade']) {
      const descriptions = withOption(name).map(({ option }) => option.description.match(/default [^;)]*(; DC [^;)]*)?/)?.[0]);
      expect(withOption(name).map((u) => u.command.name).sort(), name).toEqual(['schedule', 'sweep', 'theory']);
      expect(new Set(descriptions).size, `--${name}: ${descriptions.join(' | ')}`).toBe(1);
      expect(descriptions[0], name).not.toMatch(/\d{4,}|0\.0/);
    }
    const theory = COMMANDS.find((c) => c.name === 'theory')!;
    expect(theory.options.find((o) => o.name === 'samples')?.description).toContain(`default ${TOLERANCE_BAND_SETTINGS.samples},`);
    expect(theory.options.find((o) => o.name === 'seed')?.description).toContain(`default ${TOLERANCE_BAND_SETTINGS.seed},`);
  });

  it('a linear sweep has its own --points; log and linear counts state their defaults and are not filled in', () => {
    for (const { command } of withOption('linear')) {
      const names = command.options.map((o) => o.name);
      expect(names, command.name).toContain(SETTINGS.linearPoints.cliOption);
      expect(names, command.name).toContain(SETTINGS.pointsPerDecade.cliOption);
    }
    for (const name of [SETTINGS.linearPoints.cliOption, SETTINGS.pointsPerDecade.cliOption]) {
      for (const { command, option } of withOption(name)) {
        expect(option.defaultValue, `${command.name} --${name}`).toBeUndefined();
        expect(option.description, `${command.name} --${name}`).toMatch(/default \d+/);
      }
    }
  });
});
