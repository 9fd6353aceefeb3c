/**
 * The user's maximum stimulus is enforced by the GeneratorControl before any
 * byte is sent. The figure compared is 2·(Vpp/2 + |offset|) × (2 for a 50 Ω
 * load setting, else 1): our documented rule (app/bench/stimulus.ts), built
 * on the divider formula for a 50 Ω source (see stimulus.test.ts).
 */
import { describe, expect, it } from 'vitest';
import { memoryTransportPair } from '../../../app/scpi';
import { openInstrument, StimulusLimitError, validateProfile, type GeneratorProfile } from '../../../app/bench';
import { fakeGenerator } from './fake-generator';
import { ValidationError } from '../../../app/errors';
import scpiGenerator from '../../../app/bench/profiles/scpi-generator.json';

/** An invented generator whose amplitude is calibrated for the load it is told of, in `amplitudeUnit`. */
function calibratedProfile(amplitudeUnit = 'Vpp'): GeneratorProfile {
  const json = JSON.parse(JSON.stringify(scpiGenerator));
  json.id = 'calibrated-generator';
  json.generator.load = 'calibrated';
  json.generator.amplitudeUnit = amplitudeUnit;
  json.operations.loadHighZ = 'LOADcal HIGH';
  json.operations.load50Ohm = 'LOADcal 50';
  delete json.references;
  return validateProfile(json, 'calibrated-generator.json') as GeneratorProfile;
}

const settings = (received: string[]) => received.filter((line) => !line.endsWith('?'));

describe('GeneratorControl stimulus limit', () => {
  it('opens with the output off and, where the profile has a load setting, a known load before anything else', async () => {
    const { received } = await fakeGenerator(2, calibratedProfile());
    const outputOff = received.indexOf('OUTPut:STATe OFF');
    expect(outputOff).toBeGreaterThan(0);
    expect(received.indexOf('LOADcal HIGH')).toBeGreaterThan(outputOff);
  });

  it('with no load setting (the shipped profile) sends none, and refuses the 50 Ω setting as meaningless', async () => {
    const { control, received } = await fakeGenerator(2);
    expect(received.some((unit) => /LOAD|IMPedance/i.test(unit))).toBe(false);
    await expect(control.setLoad('50-ohm')).rejects.toThrow(/has no load setting/);
    await expect(control.setLoad('high-z')).resolves.toBeUndefined();
  });

  it('sends the amplitude in the profile\'s unit: Vpp as is, Vrms = Vpp/(2√2), Vpk = Vpp/2 (sine)', async () => {
    for (const [unit, expected] of [['Vrms', 'SOURce:VOLTage 0.353553390593'], ['Vpk', 'SOURce:VOLTage 0.5']] as const) {
      const { control, received } = await fakeGenerator(2, calibratedProfile(unit));
      await control.configureSine({ frequencyHz: 1000, amplitudeVpp: 1, offsetV: 0 });
      expect(settings(received), unit).toContain(expected);
    }
  });

  it('sends a setting within the limit', async () => {
    const { control, received } = await fakeGenerator(2);
    await control.configureSine({ frequencyHz: 1000, amplitudeVpp: 1.5, offsetV: 0.25 });
    expect(settings(received)).toEqual(expect.arrayContaining(['SOURce:FUNCtion SINusoid', 'SOURce:FREQuency 1000', 'SOURce:VOLTage 1.5', 'SOURce:VOLTage:OFFSet 0.25']));
  });

  it('refuses an amplitude above the limit with StimulusLimitError and sends nothing', async () => {
    const { control, received } = await fakeGenerator(2);
    const before = received.length;
    const error = await control.configureSine({ frequencyHz: 1000, amplitudeVpp: 2.1, offsetV: 0 }).catch((e) => e);
    expect(error).toBeInstanceOf(StimulusLimitError);
    expect(error).toMatchObject({ requestedVpp: 2.1, maxStimulusVpp: 2 });
    expect(received.length).toBe(before);
  });

  it('counts |offset| as peak: 1 Vpp with −0.6 V offset is 2.2 Vpp worst case', async () => {
    const { control, received } = await fakeGenerator(2);
    const before = received.length;
    await expect(control.configureSine({ frequencyHz: 1000, amplitudeVpp: 1, offsetV: -0.6 })).rejects.toBeInstanceOf(StimulusLimitError);
    expect(received.length).toBe(before);
  });

  it('refuses a DC level whose doubled magnitude exceeds the limit', async () => {
    const { control } = await fakeGenerator(2);
    await expect(control.configureDc(1)).resolves.toBeUndefined();
    await expect(control.configureDc(-1.01)).rejects.toBeInstanceOf(StimulusLimitError);
  });

  it('doubles the open-circuit figure for a 50 Ω load setting, and refuses a load change that would exceed the limit', async () => {
    const { control, received } = await fakeGenerator(2, calibratedProfile());
    await control.configureSine({ frequencyHz: 1000, amplitudeVpp: 1.5, offsetV: 0 });
    const before = received.length;
    await expect(control.setLoad('50-ohm')).rejects.toBeInstanceOf(StimulusLimitError);
    expect(received.length).toBe(before);
    await control.configureSine({ frequencyHz: 1000, amplitudeVpp: 0.9, offsetV: 0 });
    await control.setLoad('50-ohm');
    await expect(control.configureSine({ frequencyHz: 1000, amplitudeVpp: 1.1, offsetV: 0 })).rejects.toBeInstanceOf(StimulusLimitError);
  });

  it('orders changes so no intermediate state exceeds the limit: shrink amplitude before growing offset', async () => {
    const { control, received } = await fakeGenerator(2);
    await control.configureSine({ frequencyHz: 1000, amplitudeVpp: 2, offsetV: 0 });
    received.length = 0;
    await control.configureSine({ frequencyHz: 1000, amplitudeVpp: 1, offsetV: 0.5 });
    const sent = settings(received);
    expect(sent.indexOf('SOURce:VOLTage 1')).toBeLessThan(sent.indexOf('SOURce:VOLTage:OFFSet 0.5'));
  });

  it('refuses frequencies outside the profile range, and a non-finite value, as ValidationError', async () => {
    const { control } = await fakeGenerator(2);
    await expect(control.configureSine({ frequencyHz: 1e9, amplitudeVpp: 1, offsetV: 0 })).rejects.toBeInstanceOf(ValidationError);
    await expect(control.configureSine({ frequencyHz: Number.NaN, amplitudeVpp: 1, offsetV: 0 })).rejects.toBeInstanceOf(ValidationError);
  });

  it('will not switch the output on before the generator is configured (its own settings are unknown)', async () => {
    const { control, received } = await fakeGenerator(2);
    const before = received.length;
    await expect(control.setOutput(true)).rejects.toThrow(/not been configured/);
    expect(received.length).toBe(before);
  });

  it('switches between sine and DC with the output off, so a remembered setting never reaches the circuit', async () => {
    const { control, received } = await fakeGenerator(2);
    await control.configureSine({ frequencyHz: 1000, amplitudeVpp: 2, offsetV: 0 });
    await control.setOutput(true);
    received.length = 0;
    await control.configureDc(0.9);
    await control.configureSine({ frequencyHz: 1000, amplitudeVpp: 0.2, offsetV: 0 });
    const sent = settings(received);
    // DC 0.9 V kept as offset under a remembered 2 Vpp sine would be 2·(1 + 0.9) = 3.8 Vpp: must not happen live.
    expect(sent).toEqual([
      'OUTPut:STATe OFF', 'SOURce:FUNCtion DC', 'SOURce:VOLTage:OFFSet 0.9', 'OUTPut:STATe ON',
      'OUTPut:STATe OFF', 'SOURce:FUNCtion SINusoid', 'SOURce:VOLTage:OFFSet 0', 'SOURce:VOLTage 0.2', 'OUTPut:STATe ON',
    ]);
  });

  it('with the output confirmed off, a configure goes out as one program message ending in the error check; the output comes on in the next', async () => {
    const { control, messages } = await fakeGenerator(2);
    messages.length = 0;
    await control.configureSine({ frequencyHz: 1000, amplitudeVpp: 1.5, offsetV: 0.25 });
    expect(messages).toEqual([':SOURce:FUNCtion SINusoid;:SOURce:FREQuency 1000;:SOURce:VOLTage 1.5;:SOURce:VOLTage:OFFSet 0.25;:SYSTem:ERRor?']);
    await control.setOutput(true);
    expect(messages.slice(1)).toEqual([':OUTPut:STATe ON;:SYSTem:ERRor?']);
  });

  it('with the output on, each change is its own message, confirmed before the next goes out', async () => {
    const { control, messages } = await fakeGenerator(2);
    await control.configureSine({ frequencyHz: 1000, amplitudeVpp: 1.5, offsetV: 0.25 });
    await control.setOutput(true);
    messages.length = 0;
    await control.configureSine({ frequencyHz: 2000, amplitudeVpp: 1, offsetV: 0.5 });
    expect(messages).toEqual([':SOURce:FREQuency 2000;:SYSTem:ERRor?', ':SOURce:VOLTage 1;:SYSTem:ERRor?', ':SOURce:VOLTage:OFFSet 0.5;:SYSTem:ERRor?']);
  });

  it('will not open a generator without a maximum stimulus', async () => {
    const { a } = memoryTransportPair();
    await expect(openInstrument('memory', 'generator', 'scpi-generator', { transport: a })).rejects.toThrow(/maxStimulusVpp/);
  });
});
