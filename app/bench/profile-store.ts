/**
 * Finding profiles: the shipped generic ones plus a user folder (an explicit
 * path, or the ROLLOFF_PROFILE_DIR environment variable).
 */
import { readdirSync, readFileSync, existsSync, statSync } from 'node:fs';
import { join } from 'node:path';
import type { InstrumentRole } from '../contract/contract';
import { ProfileError } from './errors';
import { validateProfile, type Profile, type ProfileFor } from './profile';
import scpiGenerator from './profiles/scpi-generator.json';
import scpiMeter from './profiles/scpi-meter.json';
import scpiScope from './profiles/scpi-scope.json';

// Imported as modules (not read from disk) so bundled builds carry them.
const BUILT_IN_SOURCES: Array<[string, unknown]> = [
  ['scpi-generator.json', scpiGenerator],
  ['scpi-meter.json', scpiMeter],
  ['scpi-scope.json', scpiScope],
];

export const PROFILE_DIR_ENV = 'ROLLOFF_PROFILE_DIR';

export function builtInProfiles(): Profile[] {
  return BUILT_IN_SOURCES.map(([name, json]) => validateProfile(json, `built-in ${name}`, true));
}

/** Profiles from a folder of *.json files; every file must be valid. */
export function profilesInFolder(folder: string): Profile[] {
  if (!existsSync(folder) || !statSync(folder).isDirectory()) {
    throw new ProfileError(folder, '(folder)', 'is not a folder', `Create it, or point --profile-dir or ${PROFILE_DIR_ENV} at an existing folder of profile files.`);
  }
  return readdirSync(folder)
    .filter((name) => name.toLowerCase().endsWith('.json'))
    .sort()
    .map((name) => {
      const file = join(folder, name);
      let json: unknown;
      try {
        json = JSON.parse(readFileSync(file, 'utf8'));
      } catch (error) {
        throw new ProfileError(file, '(file)', `is not valid JSON: ${(error as Error).message}`);
      }
      return validateProfile(json, file);
    });
}

/** Built-in profiles plus the user folder, if any. Ids must be unique. */
export function loadProfiles(folder: string | undefined = process.env[PROFILE_DIR_ENV]): Profile[] {
  const all = [...builtInProfiles(), ...(folder ? profilesInFolder(folder) : [])];
  const seen = new Map<string, Profile>();
  for (const profile of all) {
    const earlier = seen.get(profile.id);
    if (earlier) throw new ProfileError(profile.source, 'id', `"${profile.id}" is already used by ${earlier.source}`, 'Give your profile an id of its own.');
    seen.set(profile.id, profile);
  }
  return all;
}

/** The profile with `id` for `role`, or a ProfileError listing what exists. */
export function findProfile<R extends InstrumentRole>(id: string, role: R, folder?: string): ProfileFor<R> {
  const profiles = loadProfiles(folder);
  const profile = profiles.find((p) => p.id === id);
  const forRole = profiles.filter((p) => p.role === role).map((p) => p.id).join(', ');
  if (!profile) throw new ProfileError(id, 'id', 'no profile with this id', `Profiles for a ${role}: ${forRole}.`);
  if (profile.role !== role) throw new ProfileError(profile.source, 'role', `is "${profile.role}", but a ${role} is needed`, `Profiles for a ${role}: ${forRole}.`);
  return profile as ProfileFor<R>;
}

/** The shipped default profile id for each role. */
export const DEFAULT_PROFILE_ID: Record<InstrumentRole, string> = {
  generator: 'scpi-generator',
  meter: 'scpi-meter',
  scope: 'scpi-scope',
};
