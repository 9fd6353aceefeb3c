/**
 * `rolloff profile list | show ID | new ID --based-on ID | check ADDRESS --profile ID`:
 * the instrument profiles, a copy to edit in the profile folder, and the
 * checker that tells which of a profile's commands an instrument accepts.
 */
import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { ValidationError } from '../../errors';
import { checkProfile, loadProfiles, PROFILE_DIR_ENV, validateProfile, type Profile } from '../../bench';
import type { ProfileCheckReport } from '../../contract/contract';
import { optionNumber, optionString, requirePositional, type CommandSpec, type OptionSpec } from '../args';
import { maxStimulusFrom, maxStimulusOption, replyTimeoutFrom, replyTimeoutOption } from '../common-options';

/** The profile folder option; every command that loads profiles takes it. */
export const PROFILE_DIR_OPTION: OptionSpec = { name: 'profile-dir', kind: 'string', placeholder: 'DIR', description: `folder of your own profiles (else ${PROFILE_DIR_ENV})` };

export const profileCommand: CommandSpec = {
  name: 'profile',
  summary: 'List, show, copy and check instrument profiles',
  usage: 'list | show ID | new ID --based-on ID | check ADDRESS --profile ID [--max-stimulus VPP]  [--profile-dir DIR]',
  options: [
    PROFILE_DIR_OPTION,
    // Not --from: elsewhere --from is where a sweep starts.
    { name: 'based-on', kind: 'string', placeholder: 'ID', description: 'new: the profile to copy' },
    { name: 'profile', kind: 'string', placeholder: 'ID', description: 'check: the profile to check' },
    { ...replyTimeoutOption(' (check; default: the profile\'s); a refused query costs this long'), defaultValue: undefined },
    maxStimulusOption('check of a generator: the check itself uses the smallest amplitude it can'),
  ],
  details: `
check connects, sends each operation of the profile once in a harmless order (a generator's output
off first, the smallest amplitude the profile allows, never above --max-stimulus, and the output off
again at the end whatever happens), and prints per operation: accepted, refused (the instrument's SCPI
error), timed out, or a reply not in the form the profile expects (with the bytes received).
Examples:
  rolloff profile list
  rolloff profile new lab-scope --based-on scpi-scope --profile-dir ~/rolloff-profiles
  rolloff profile check tcp://127.0.0.1:5025 --profile lab-scope --profile-dir ~/rolloff-profiles`,
  async run(parsed) {
    const action = requirePositional(parsed, 0, 'ACTION (list, show, new or check)');
    const folder = optionString(parsed, 'profile-dir') ?? process.env[PROFILE_DIR_ENV];
    const profiles = loadProfiles(folder);
    const byId = (id: string, what: string): Profile => {
      const found = profiles.find((p) => p.id === id);
      if (!found) throw new ValidationError(what, `no profile "${id}"`, `Profiles: ${profiles.map((p) => p.id).join(', ')}.`);
      return found;
    };
    if (action === 'list') {
      for (const p of profiles) process.stdout.write(`${p.id.padEnd(24)} ${p.role.padEnd(10)} ${p.builtIn ? 'shipped' : 'yours  '}  ${p.description}\n`);
      return 0;
    }
    if (action === 'show') {
      const profile = byId(requirePositional(parsed, 1, 'ID'), 'ID');
      process.stdout.write(`${JSON.stringify(profileFileJson(profile), null, 2)}\n`);
      return 0;
    }
    if (action === 'new') {
      const id = requirePositional(parsed, 1, 'ID');
      const from = optionString(parsed, 'based-on');
      if (!from) throw new ValidationError('--based-on', 'is required: the profile to copy', 'e.g. rolloff profile new lab-scope --based-on scpi-scope');
      if (!folder) throw new ValidationError('--profile-dir', 'no profile folder given', `Give --profile-dir DIR or set ${PROFILE_DIR_ENV}.`);
      const json = { ...profileFileJson(byId(from, '--based-on')), id, description: `copy of ${from}: describe your instrument here` };
      const file = join(folder, `${id}.json`);
      validateProfile(json, file); // the new id must be a valid one
      if (profiles.some((p) => p.id === id)) throw new ValidationError('ID', `"${id}" is already a profile`, 'Choose another id.');
      if (existsSync(file)) throw new ValidationError('ID', `${file} exists`, 'Choose another id, or edit that file.');
      mkdirSync(folder, { recursive: true });
      writeFileSync(file, `${JSON.stringify(json, null, 2)}\n`, { flag: 'wx' });
      process.stdout.write(`wrote ${file}\nEdit it from your instrument's programming manual, then: rolloff profile check ADDRESS --profile ${id} --profile-dir ${folder}\n`);
      return 0;
    }
    if (action === 'check') {
      const address = requirePositional(parsed, 1, 'ADDRESS');
      const id = optionString(parsed, 'profile');
      if (!id) throw new ValidationError('--profile', 'is required: the profile to check');
      const report = await checkProfile(address, byId(id, '--profile'), { maxStimulusVpp: maxStimulusFrom(parsed), timeoutS: optionNumber(parsed, 'timeout') === undefined ? undefined : replyTimeoutFrom(parsed) });
      process.stdout.write(formatCheckReport(report));
      return report.checks.every((c) => c.outcome === 'accepted') ? 0 : 3;
    }
    throw new ValidationError('ACTION', `"${action}" is not list, show, new or check`);
  },
};

/** A profile as its file holds it (without where it was loaded from). */
function profileFileJson(profile: Profile): Record<string, unknown> {
  const { source: _source, builtIn: _builtIn, waitsS, ...json } = profile;
  const operations = Object.fromEntries(
    Object.entries(profile.operations).map(([name, commands]) => {
      const entries = commands.map((send, i) => (waitsS[name]?.[i] ? { send, waitS: waitsS[name][i] } : send));
      return [name, entries.length === 1 ? entries[0] : entries];
    }),
  );
  return { ...json, operations };
}

/** The per-operation table. */
export function formatCheckReport(report: ProfileCheckReport): string {
  const lines = [`${report.address}: ${report.identity.manufacturer}, ${report.identity.model} — profile ${report.profileId} (${report.role})`, ''];
  const width = Math.max(10, ...report.checks.map((c) => c.operation.length));
  for (const c of report.checks) {
    const outcome =
      c.outcome === 'refused' ? `refused ${c.errorCode},"${c.errorMessage}"` : c.outcome === 'unparsed' ? `reply not as expected: ${c.detail ?? ''} received ${JSON.stringify(c.received ?? '')}` : c.outcome === 'accepted' ? `accepted${c.received ? ` (${c.received})` : ''}` : `${c.outcome}${c.detail ? ` (${c.detail})` : ''}`;
    lines.push(`${c.operation.padEnd(width)}  ${`${c.replyMs.toFixed(1)} ms`.padStart(9)}  ${outcome}`);
    if (c.commands) lines.push(`${''.padEnd(width)}             ${c.commands}`);
  }
  const refused = report.checks.filter((c) => c.outcome !== 'accepted').length;
  lines.push('', refused === 0 ? 'Every operation accepted.' : `${refused} of ${report.checks.length} not accepted: fix those templates from the instrument's manual and check again.`);
  return `${lines.join('\n')}\n`;
}
