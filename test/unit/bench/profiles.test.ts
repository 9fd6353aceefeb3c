/**
 * Profiles: the shipped ones validate; broken ones are refused with the file
 * and field named (common practice: validate data files at the boundary).
 */
import { mkdtempSync, readFileSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { builtInProfiles, findProfile, loadProfiles, ProfileError, validateProfile, OPERATION_RULES } from '../../../app/bench';
import scpiGenerator from '../../../app/bench/profiles/scpi-generator.json';
import scpiScope from '../../../app/bench/profiles/scpi-scope.json';

const clone = <T>(value: T): T => JSON.parse(JSON.stringify(value));

function refusal(json: unknown): ProfileError {
  try {
    validateProfile(json, 'my-profile.json');
  } catch (error) {
    expect(error).toBeInstanceOf(ProfileError);
    return error as ProfileError;
  }
  throw new Error('expected the profile to be refused');
}

describe('shipped profiles', () => {
  it('all validate, one per role, with every required operation', () => {
    const profiles = builtInProfiles();
    expect(profiles.map((p) => `${p.role}:${p.id}`).sort()).toEqual(['generator:scpi-generator', 'meter:scpi-meter', 'scope:scpi-scope']);
    for (const profile of profiles) {
      const required = Object.entries(OPERATION_RULES[profile.role]).filter(([, rule]) => rule.required).map(([name]) => name);
      for (const name of required) expect(profile.operations[name], `${profile.id} ${name}`).toBeDefined();
    }
  });

  it('carry no maker or model names: ids are generic', () => {
    for (const profile of builtInProfiles()) expect(profile.id).toMatch(/^scpi-(generator|meter|scope)$/);
  });

  it('name where each command comes from (generator, meter and scope)', () => {
    const profiles = builtInProfiles();
    expect(profiles.map((p) => p.role).sort()).toEqual(['generator', 'meter', 'scope']);
    for (const profile of profiles) {
      for (const name of Object.keys(profile.operations)) expect(profile.references[`operations.${name}`], `${profile.id} ${name}`).toMatch(/SCPI-1999 Vol\. \d|IEEE 488\.2|our own/);
      profile.init.forEach((_, i) => expect(profile.references[`init[${i}]`], `${profile.id} init[${i}]`).toBeDefined());
    }
  });

  it('the scope profile sends none of the old dialect headers', () => {
    const scope = builtInProfiles().find((p) => p.id === 'scpi-scope')!;
    const sent = [...scope.init, ...Object.values(scope.operations).flat()].join(' ');
    for (const word of ['CHANnel', 'TIMebase', 'WAVeform', 'MEASure', 'PREamble', 'ACQuire']) expect(sent).not.toContain(word);
  });

  it('the generator profile sends no load or unit-selection header: SCPI-1999 defines neither for a source amplitude', () => {
    const generator = builtInProfiles().find((p) => p.id === 'scpi-generator')!;
    const sent = [...generator.init, ...Object.values(generator.operations).flat()].join(' ');
    for (const word of ['OUTPut:LOAD', 'UNIT:VOLTage']) expect(sent.toUpperCase()).not.toContain(word.toUpperCase());
  });
});

describe('broken profiles are refused naming the field', () => {
  it('a generator without error checks (a refused amplitude would go unseen)', () => {
    const json = { ...clone(scpiGenerator), checkErrors: false };
    expect(refusal(json).field).toBe('checkErrors');
  });

  it('a minimum amplitude that is negative or not below the maximum', () => {
    for (const minAmplitudeVpp of [-0.1, 20, 25, 'small']) {
      const json = clone(scpiGenerator) as Record<string, any>;
      json.generator.minAmplitudeVpp = minAmplitudeVpp;
      expect(refusal(json).field).toBe('generator.minAmplitudeVpp');
    }
  });

  it('missing operation', () => {
    const json = clone(scpiGenerator) as Record<string, any>;
    delete json.operations.frequency;
    const error = refusal(json);
    expect(error.field).toBe('operations.frequency');
    expect(error.message).toContain('my-profile.json');
    expect(error.message).toContain('missing');
  });

  it('unknown placeholder in a template', () => {
    const json = clone(scpiGenerator) as Record<string, any>;
    json.operations.frequency = 'SOURce:FREQuency {freq}';
    const error = refusal(json);
    expect(error.field).toBe('operations.frequency');
    expect(error.message).toMatch(/unknown placeholder \{freq\}.*\{frequencyHz\}/);
  });

  it('unbalanced brace', () => {
    const json = clone(scpiGenerator) as Record<string, any>;
    json.operations.offset = 'SOURce:VOLTage:OFFSet {offsetV';
    expect(refusal(json).field).toBe('operations.offset');
  });

  it('a query where its reply would never be read', () => {
    const json = clone(scpiGenerator) as Record<string, any>;
    json.operations.outputOn = ['OUTPut ON', 'OUTPut?'];
    expect(refusal(json).field).toBe('operations.outputOn');
  });

  it('a read operation that does not end in a query', () => {
    const json = clone(scpiGenerator) as Record<string, any>;
    json.operations.readFrequency = 'SOURce:FREQuency';
    expect(refusal(json).message).toMatch(/must end with a query/);
  });

  it('unknown operation, unknown field, bad role, bad limits', () => {
    const withUnknownOp = clone(scpiGenerator) as Record<string, any>;
    withUnknownOp.operations.sweepTheMoon = 'X';
    expect(refusal(withUnknownOp).field).toBe('operations.sweepTheMoon');
    expect(refusal({ ...clone(scpiGenerator), colour: 'red' }).field).toBe('colour');
    expect(refusal({ ...clone(scpiGenerator), role: 'toaster' }).field).toBe('role');
    const badLimits = clone(scpiGenerator) as Record<string, any>;
    badLimits.generator.maxFrequencyHz = 0.0001;
    expect(refusal(badLimits).field).toBe('generator.maxFrequencyHz');
  });

  it('scope data and scaling: integer samples without volts per code, a quantity with two sources, a missing scaling query, a bad poll', () => {
    const noVoltsPerCode = clone(scpiScope) as Record<string, any>;
    noVoltsPerCode.scope.scaling.fields = ['points', 'sampleIntervalS'];
    expect(refusal(noVoltsPerCode)).toMatchObject({ field: 'scope.scaling' });
    expect(refusal(noVoltsPerCode).message).toMatch(/voltsPerCode for int16/);
    const twice = clone(scpiScope) as Record<string, any>;
    twice.scope.scaling.fixed = { voltsPerCode: 0.001 };
    expect(refusal(twice).field).toBe('scope.scaling.fixed.voltsPerCode');
    const noQuery = clone(scpiScope) as Record<string, any>;
    delete noQuery.operations.waveformScaling;
    expect(refusal(noQuery).field).toBe('operations.waveformScaling');
    const badSample = clone(scpiScope) as Record<string, any>;
    badSample.scope.data.sample = 'int12';
    expect(refusal(badSample).field).toBe('scope.data.sample');
    const noOrder = clone(scpiScope) as Record<string, any>;
    delete noOrder.scope.data.byteOrder;
    expect(refusal(noOrder).field).toBe('scope.data.byteOrder');
    const badPoll = clone(scpiScope) as Record<string, any>;
    badPoll.scope.acquisitionComplete = { method: 'poll', query: 'STATus:OPERation:CONDition', until: { bitsClear: 16 } };
    expect(refusal(badPoll).field).toBe('scope.acquisitionComplete.query');
    const badUntil = clone(scpiScope) as Record<string, any>;
    badUntil.scope.acquisitionComplete = { method: 'poll', query: 'STATus:OPERation:CONDition?', until: { bitsClear: -1 } };
    expect(refusal(badUntil).field).toBe('scope.acquisitionComplete.until.bitsClear');
    const older = clone(scpiScope) as Record<string, any>;
    older.scope.encoding = 'int16-le';
    expect(refusal(older).message).toMatch(/older form/);
  });

  it('references must name a field of the profile', () => {
    const json = clone(scpiScope) as Record<string, any>;
    json.references['operations.measurePhaseDeg'] = 'nowhere';
    expect(refusal(json).field).toBe('references.operations.measurePhaseDeg');
  });
});

describe('user profile folder', () => {
  let folder: string | undefined;
  afterEach(() => {
    if (folder) rmSync(folder, { recursive: true, force: true });
  });

  it('adds valid user profiles and finds them by id and role', () => {
    folder = mkdtempSync(join(tmpdir(), 'rolloff-profiles-'));
    writeFileSync(join(folder, 'lab-gen.json'), JSON.stringify({ ...clone(scpiGenerator), id: 'lab-gen', description: 'our bench generator' }));
    expect(loadProfiles(folder).map((p) => p.id)).toContain('lab-gen');
    expect(findProfile('lab-gen', 'generator', folder).builtIn).toBe(false);
    expect(() => findProfile('lab-gen', 'meter', folder)).toThrow(ProfileError);
  });

  it('refuses bad JSON naming the file, and a duplicate id naming both files', () => {
    folder = mkdtempSync(join(tmpdir(), 'rolloff-profiles-'));
    writeFileSync(join(folder, 'broken.json'), '{ "id": ');
    expect(() => loadProfiles(folder)).toThrow(/broken\.json.*not valid JSON/);
    rmSync(join(folder, 'broken.json'));
    writeFileSync(join(folder, 'copy.json'), JSON.stringify(scpiGenerator));
    expect(() => loadProfiles(folder)).toThrow(/copy\.json.*already used by built-in scpi-generator\.json/);
  });

  it('an unknown id lists the profiles that exist for the role', () => {
    expect(() => findProfile('nope', 'meter')).toThrow(ProfileError);
    try {
      findProfile('nope', 'meter');
    } catch (error) {
      expect((error as ProfileError).hint).toContain('scpi-meter');
    }
  });
});

describe('the worked examples of app/bench/profiles/README.md', () => {
  it('each is a valid profile, one per role', () => {
    const readme = readFileSync(join(__dirname, '../../../app/bench/profiles/README.md'), 'utf8');
    const examples = [...readme.matchAll(/```json\n([\s\S]*?)```/g)].map((m) => JSON.parse(m[1]));
    const roles = examples.map((json, i) => validateProfile(json, `README example ${i + 1}`).role);
    expect(new Set(roles)).toEqual(new Set(['generator', 'meter', 'scope']));
  });
});
