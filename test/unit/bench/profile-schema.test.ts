/**
 * The profile schema refuses what the hand-written checks let through: names
 * inherited by every object (constructor, toString) taken as operations or
 * references, and misspelt settings of the generator and the meter, which
 * were dropped without a word (a misspelt minAmplitudeVpp fell back to 0).
 * Each refusal names the file, the field, what is known, and a hint.
 */
import { describe, expect, it } from 'vitest';
import { refusalOf } from '../../helpers/refusal';
import { ProfileError, validateProfile } from '../../../app/bench';
import scpiGenerator from '../../../app/bench/profiles/scpi-generator.json';
import scpiMeter from '../../../app/bench/profiles/scpi-meter.json';
import scpiScope from '../../../app/bench/profiles/scpi-scope.json';

const clone = <T>(value: T): Record<string, any> => JSON.parse(JSON.stringify(value));

const refusal = (json: unknown): ProfileError => refusalOf(ProfileError, () => validateProfile(json, 'lab.json'));

describe('names every object inherits are no operations and no references', () => {
  for (const name of ['constructor', 'toString', 'hasOwnProperty']) {
    it(`operations.${name} is refused, naming the generator's operations`, () => {
      const json = clone(scpiGenerator);
      json.operations[name] = 'OUTPut:STATe ON';
      const error = refusal(json);
      expect(error.field).toBe(`operations.${name}`);
      expect(error.message).toContain('is not a known generator operation');
      expect(error.hint).toContain('sineFunction');
    });

    it(`references."operations.${name}" is refused`, () => {
      const json = clone(scpiMeter);
      json.references[`operations.${name}`] = 'nowhere';
      expect(refusal(json).field).toBe(`references.operations.${name}`);
    });
  }
});

describe('misspelt settings are refused, not dropped', () => {
  it('a generator field in the wrong case (minAmplitudeVPP would have left the minimum at 0)', () => {
    const json = clone(scpiGenerator);
    delete json.generator.minAmplitudeVpp;
    json.generator.minAmplitudeVPP = 0.05;
    const error = refusal(json);
    expect(error.field).toBe('generator.minAmplitudeVPP');
    expect(error.message).toContain('lab.json');
    expect(error.hint).toContain('minAmplitudeVpp');
  });

  it('a meter field that does not exist', () => {
    const json = clone(scpiMeter);
    json.meter = { powerLineHz: 60, powerlineHz: 50 };
    expect(refusal(json).field).toBe('meter.powerlineHz');
  });

  it('a poll field that does not exist, named by itself rather than the whole completion', () => {
    const json = clone(scpiScope);
    json.scope.acquisitionComplete = { method: 'opc', intervalS: 0.1 };
    expect(refusal(json).field).toBe('scope.acquisitionComplete.intervalS');
  });
});

describe('wrong nested types name the deepest field, with what was expected and what arrived', () => {
  it('a wait given as text', () => {
    const json = clone(scpiGenerator);
    json.operations.outputOn = { send: 'OUTPut:STATe ON', waitS: '0.2' };
    const error = refusal(json);
    expect(error.field).toBe('operations.outputOn.waitS');
    expect(error.message).toMatch(/seconds from 0 to 60, got "0\.2"/);
  });

  it('a fixed scaling quantity given as text', () => {
    const json = clone(scpiScope);
    json.scope.scaling = { fields: ['points', 'sampleIntervalS', 'xOriginS', 'codeOffset', 'voltsOffset'], fixed: { voltsPerCode: '1m' } };
    const error = refusal(json);
    expect(error.field).toBe('scope.scaling.fixed.voltsPerCode');
    expect(error.message).toContain('got "1m"');
  });

  it('a maximum frequency below the minimum says both numbers', () => {
    const json = clone(scpiGenerator);
    json.generator.maxFrequencyHz = 0.0001;
    expect(refusal(json).message).toMatch(/above minFrequencyHz \(0\.001 Hz\), got 0\.0001/);
  });
});

describe('defaults are filled in as before', () => {
  it('an absent checkErrors, timeoutS, programMessages, meter settings, divisions and completion', () => {
    const meter = clone(scpiMeter);
    for (const key of ['checkErrors', 'timeoutS', 'programMessages', 'meter', 'references']) delete meter[key];
    expect(validateProfile(meter, 'lab.json')).toMatchObject({ checkErrors: true, timeoutS: 5, programMessages: 'joined', meter: { powerLineHz: 50 }, references: {}, description: expect.any(String) });
    const scope = clone(scpiScope);
    delete scope.scope.divisions;
    delete scope.scope.acquisitionComplete;
    scope.scope.data = { format: 'binary', sample: 'uint8' };
    scope.scope.scaling = { fields: ['sampleIntervalS'], fixed: { voltsPerCode: 0.01 } };
    expect(validateProfile(scope, 'lab.json')).toMatchObject({ scope: { divisions: 10, acquisitionComplete: { method: 'opc' }, data: { byteOrder: 'big' } } });
  });

  it('waits are kept per command of the operations that have one', () => {
    const json = clone(scpiGenerator);
    json.operations.outputOn = ['OUTPut:STATe ON', { send: 'SOURce:FUNCtion SINusoid', waitS: 0.2 }];
    const profile = validateProfile(json, 'lab.json');
    expect(profile.operations.outputOn).toEqual(['OUTPut:STATe ON', 'SOURce:FUNCtion SINusoid']);
    expect(profile.waitsS).toEqual({ outputOn: [0, 0.2] });
  });
});
