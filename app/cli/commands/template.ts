/**
 * `rolloff template`: lists the design templates, shows one template's
 * parameters, or writes a design file from a template.
 */
import { writeFileSync } from 'node:fs';
import { UserError, ValidationError } from '../../errors';
import { parseEngineering } from '../../units';
import { makeDesignFromTemplate, parseDesign, templateParameterText, TEMPLATES } from '../../circuit';
import { optionFlag, optionString, type CommandSpec, type ParsedArgs } from '../args';

export const templateCommand: CommandSpec = {
  name: 'template',
  summary: 'List design templates, show their parameters, or write a design file from one',
  usage: '[ID] [--param name=value ...] [--out FILE]',
  options: [
    { name: 'param', kind: 'string', placeholder: 'NAME=VALUE', repeatable: true, description: 'set a template parameter (SI units, engineering notation: rf=10k, cf=15n; the slew rate sr in V/µs)' },
    { name: 'out', kind: 'string', placeholder: 'PATH', description: 'write the design file here instead of printing it' },
    { name: 'force', kind: 'flag', description: 'allow --out to replace an existing file' },
    { name: 'info', kind: 'flag', description: 'show the template\'s parameters and defaults instead of writing a design' },
  ],
  details: `
Examples:
  rolloff template
  rolloff template inverting-lowpass --info
  rolloff template inverting-lowpass --param rf=22k --param cf=4.7n --out lowpass.json`,
  async run(parsed) {
    const id = parsed.positionals[0];
    if (parsed.positionals.length > 1) throw new ValidationError('arguments', `unexpected "${parsed.positionals[1]}"`, 'Give one template id; set parameters with --param name=value.');
    if (id === undefined) {
      process.stdout.write(listing());
      return 0;
    }
    const template = TEMPLATES.find((t) => t.id === id);
    if (!template) throw new ValidationError(`template "${id}"`, 'no such template', `Run "rolloff template" for the list: ${TEMPLATES.map((t) => t.id).join(', ')}.`);
    if (optionFlag(parsed, 'info')) {
      process.stdout.write(parameterTable(template.id));
      return 0;
    }
    const file = makeDesignFromTemplate(id, parameters(parsed));
    parseDesign(file, `template ${id}`); // refuse to write a design the engine cannot analyse
    const text = JSON.stringify(file, null, 2) + '\n';
    const out = optionString(parsed, 'out');
    if (out === undefined) {
      process.stdout.write(text);
      return 0;
    }
    try {
      writeFileSync(out, text, { flag: optionFlag(parsed, 'force') ? 'w' : 'wx' });
    } catch (error) {
      const code = (error as NodeJS.ErrnoException).code;
      if (code === 'EEXIST') throw new UserError(`${out} already exists; nothing was written`, 'Choose another name, or add --force to replace it.');
      throw new UserError(`cannot write ${out}: ${(error as Error).message}`, 'Check the folder exists and is writable.');
    }
    process.stdout.write(`Wrote ${out} (${template.title}).\n`);
    return 0;
  },
};

function parameters(parsed: ParsedArgs): Record<string, number> {
  const values: Record<string, number> = {};
  for (const item of (parsed.options.param as string[] | undefined) ?? []) {
    const at = item.indexOf('=');
    if (at <= 0) throw new ValidationError(`--param ${item}`, 'must look like name=value', 'For example --param rf=10k.');
    const name = item.slice(0, at).trim();
    values[name] = parseEngineering(item.slice(at + 1).trim(), `--param ${name}`);
  }
  return values;
}

function listing(): string {
  const width = Math.max(...TEMPLATES.map((t) => t.id.length)) + 2;
  const lines = ['Design templates (rolloff template ID --info for parameters):', ''];
  for (const t of TEMPLATES) lines.push(`  ${t.id.padEnd(width)}${t.title}`);
  return lines.join('\n') + '\n';
}

function parameterTable(id: string): string {
  const template = TEMPLATES.find((t) => t.id === id)!;
  const width = Math.max(...template.parameters.map((p) => p.name.length)) + 2;
  const lines = [template.title, '', template.description, '', 'Parameters (--param name=value):'];
  for (const p of template.parameters) {
    const value = templateParameterText(p.defaultValue, p.unit, { withUnit: true });
    lines.push(`  ${p.name.padEnd(width)}${value.padEnd(12)}${p.description}`);
  }
  return lines.join('\n') + '\n';
}
