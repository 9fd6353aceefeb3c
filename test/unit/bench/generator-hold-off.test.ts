/**
 * The quiet state of a noise run (GeneratorControl.holdOff): output off first,
 * then the smallest amplitude and no offset, checked against the maximum
 * stimulus like every setting, and the instrument's own report of its output
 * state trusted over the command's acceptance. OUTPut[:STATe]? answers 1/0
 * (SCPI-1999 Vol. 1 boolean response data, recalled from memory).
 */
import { describe, expect, it } from 'vitest';
import { findProfile, GeneratorOutputOnError, StimulusLimitError, validateProfile, type GeneratorProfile } from '../../../app/bench';
import { ScpiMalformedReplyError } from '../../../app/scpi/errors';
import scpiGenerator from '../../../app/bench/profiles/scpi-generator.json';
import { fakeGenerator } from './fake-generator';

const settings = (received: string[]) => received.filter((line) => !line.endsWith('?'));

function withoutReadOutput(): GeneratorProfile {
  const json = JSON.parse(JSON.stringify(scpiGenerator));
  json.id = 'generator-without-output-query';
  delete json.operations.readOutput;
  delete json.references;
  return validateProfile(json, 'generator-without-output-query.json') as GeneratorProfile;
}

describe('GeneratorControl.holdOff', () => {
  it('switches the output off before the smallest amplitude and zero offset, then reads the state back', async () => {
    const { control, received } = await fakeGenerator(2, undefined, (query) => (query === 'OUTPut:STATe?' ? '0' : '+1.0E+03'));
    await control.configureSine({ frequencyHz: 1000, amplitudeVpp: 1.5, offsetV: 0.2 });
    await control.setOutput(true);
    const before = received.length;
    expect(await control.holdOff()).toBe('read back');
    const sent = received.slice(before);
    const off = sent.indexOf('OUTPut:STATe OFF');
    expect(off).toBeGreaterThanOrEqual(0);
    // The shipped profile's smallest amplitude is 1 mVpp; both level changes come after the output is off.
    expect(sent.indexOf('SOURce:VOLTage 0.001')).toBeGreaterThan(off);
    expect(sent.indexOf('SOURce:VOLTage:OFFSet 0')).toBeGreaterThan(off);
    expect(sent.at(-1)).toBe('OUTPut:STATe?');
  });

  it('refuses to go on when the instrument says its output is still on', async () => {
    const { control } = await fakeGenerator(2, undefined, (query) => (query === 'OUTPut:STATe?' ? '1' : '+1.0E+03'));
    await expect(control.holdOff()).rejects.toThrow(GeneratorOutputOnError);
    await expect(control.holdOff()).rejects.toThrow(/still reports its output on \(OUTPut:STATe\? answered "1"\)/);
  });

  it('names a reply that is no output state', async () => {
    const { control } = await fakeGenerator(2, undefined, () => 'MAYBE');
    await expect(control.holdOff()).rejects.toThrow(ScpiMalformedReplyError);
  });

  it('without a readOutput operation, says the state was only commanded', async () => {
    const { control, received } = await fakeGenerator(2, withoutReadOutput());
    expect(await control.holdOff()).toBe('commanded');
    expect(received).not.toContain('OUTPut:STATe?');
  });

  it('a smallest amplitude above the maximum stimulus is refused before anything is sent', async () => {
    const { control, received } = await fakeGenerator(0.0005, findProfile('scpi-generator', 'generator'));
    const before = settings(received).length;
    await expect(control.holdOff()).rejects.toThrow(StimulusLimitError);
    expect(settings(received).length).toBe(before);
  });

  it('the control carries the profile\'s source resistance', async () => {
    const { control } = await fakeGenerator(2);
    expect(control.sourceImpedanceOhm).toBe(50);
  });
});
