/**
 * The maximum stimulus holds when the instrument refuses part of a setting.
 * The simulated generator is reached over TCP on 127.0.0.1 like a real one, a
 * `refuse` fault makes it refuse one header (-222, not applied) while taking
 * the rest, and every state it actually takes is read from the instrument
 * itself (SimGenerator.onChange), not from the control's bookkeeping.
 *
 * The figure compared with the limit is the project's rule
 * (app/bench/stimulus.ts): 2·(Vpp/2 + |offset|) × 1 for a high-Z load setting.
 * Limit 6 Vpp; the two settings used: A = 4 Vpp, 0 V offset (worst 4 Vpp) and
 * B = 0.5 Vpp, 2.5 V offset (worst 5.5 Vpp). Mixing them — 4 Vpp with 2.5 V —
 * is 9 Vpp, which must never be held with the output on.
 */
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { openInstrument, findProfile, type GeneratorControl, type OpenedInstrument } from '../../../app/bench';
import { ScpiInstrumentError } from '../../../app/scpi';
import { ValidationError } from '../../../app/errors';
import { startSimulatedBench, type SimulatedBench } from '../../../app/sim';
import type { GeneratorSettings } from '../../../app/sim/sim-generator';
import { TEST_DESIGN_JSON } from './bench-scenario';

const MAX_STIMULUS_VPP = 6;
const A = { frequencyHz: 1000, amplitudeVpp: 4, offsetV: 0 };
const B = { frequencyHz: 1000, amplitudeVpp: 0.5, offsetV: 2.5 };

// The simulated generator has no load setting: what it holds is the open-circuit voltage.
const worstVpp = (held: Readonly<GeneratorSettings>) => held.amplitudeVpp + 2 * Math.abs(held.offsetV);

describe('stimulus limit when the generator refuses part of a setting (read from the simulated generator)', () => {
  let bench: SimulatedBench;
  let opened: OpenedInstrument<'generator'>;
  let generator: GeneratorControl;
  let heldWhileOn: Array<Readonly<GeneratorSettings>> = [];

  beforeAll(async () => {
    bench = await startSimulatedBench({ design: TEST_DESIGN_JSON, tcpPort: 0, timeScale: 10 });
    bench.generator.onChange((held) => {
      if (held.on) heldWhileOn.push({ ...held });
    });
  });
  afterAll(async () => {
    await opened?.close();
    await bench?.stop();
  });

  beforeEach(async () => {
    await bench.setFault('generator', null);
    await opened?.close();
    opened = await openInstrument(bench.addresses.generator, 'generator', findProfile('scpi-generator', 'generator'), { maxStimulusVpp: MAX_STIMULUS_VPP });
    generator = opened.control;
    heldWhileOn = [];
  });

  const startAt = async (setting: typeof A) => {
    await generator.configureSine(setting);
    await generator.setOutput(true);
    expect(bench.generator.held).toMatchObject({ on: true, amplitudeVpp: setting.amplitudeVpp, offsetV: setting.offsetV });
  };
  const expectNothingAboveTheLimit = () => {
    expect(heldWhileOn.length).toBeGreaterThan(0);
    for (const held of heldWhileOn) expect(worstVpp(held), JSON.stringify(held)).toBeLessThanOrEqual(MAX_STIMULUS_VPP);
  };

  it('without refusals, both orders end at the asked setting and no state on the way exceeds the limit', async () => {
    await startAt(A);
    await generator.configureSine(B); // offset grows: amplitude first
    expect(bench.generator.held).toMatchObject({ on: true, amplitudeVpp: 0.5, offsetV: 2.5 });
    await generator.configureSine(A); // offset shrinks: offset first
    expect(bench.generator.held).toMatchObject({ on: true, amplitudeVpp: 4, offsetV: 0 });
    expectNothingAboveTheLimit();
  });

  it('the check can fail: sending B\'s offset while A\'s amplitude is held is seen as 9 Vpp', async () => {
    await startAt(A);
    await bench.generator.execute('SOURce:VOLTage:OFFSet 2.5'); // straight to the instrument, past the control
    expect(Math.max(...heldWhileOn.map(worstVpp))).toBe(9);
  });

  it('amplitude refused on the way from A to B (amplitude first): the offset is never sent, then output off', async () => {
    await startAt(A);
    await bench.setFault('generator', { kind: 'refuse', header: '[SOURce]:VOLTage[:LEVel][:IMMediate][:AMPLitude]' });
    const error = await generator.configureSine(B).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ScpiInstrumentError);
    expect((error as ScpiInstrumentError).code).toBe(-222);
    expectNothingAboveTheLimit();
    // Safe state: output off; the refused amplitude stays where it was, the offset goes to 0.
    expect(bench.generator.held).toMatchObject({ on: false, amplitudeVpp: 4, offsetV: 0 });
  });

  it('offset refused on the way from B to A (offset first): the amplitude is never sent, then output off', async () => {
    await startAt(B);
    await bench.setFault('generator', { kind: 'refuse', header: '[SOURce]:VOLTage[:LEVel][:IMMediate]:OFFSet' });
    await expect(generator.configureSine(A)).rejects.toBeInstanceOf(ScpiInstrumentError);
    expectNothingAboveTheLimit();
    // Safe state: output off and the smallest amplitude (profile minAmplitudeVpp 0.001); the offset was refused, so it stays.
    expect(bench.generator.held).toMatchObject({ on: false, amplitudeVpp: 0.001, offsetV: 2.5 });
  });

  it('amplitude refused after the offset was accepted (B to A): held within the limit, then output off', async () => {
    await startAt(B);
    await bench.setFault('generator', { kind: 'refuse', header: '[SOURce]:VOLTage[:LEVel][:IMMediate][:AMPLitude]' });
    await expect(generator.configureSine(A)).rejects.toBeInstanceOf(ScpiInstrumentError);
    expectNothingAboveTheLimit();
    expect(bench.generator.held).toMatchObject({ on: false, amplitudeVpp: 0.5, offsetV: 0 });
  });

  it('after a refusal the output cannot be switched on until the generator is configured afresh; then it works', async () => {
    await startAt(A);
    await bench.setFault('generator', { kind: 'refuse', header: '[SOURce]:VOLTage[:LEVel][:IMMediate][:AMPLitude]' });
    await expect(generator.configureSine(B)).rejects.toBeInstanceOf(ScpiInstrumentError);
    await expect(generator.setOutput(true)).rejects.toBeInstanceOf(ValidationError);
    expect(bench.generator.held.on).toBe(false);
    await bench.setFault('generator', null);
    await generator.configureSine(B);
    await generator.setOutput(true);
    expect(bench.generator.held).toMatchObject({ on: true, amplitudeVpp: 0.5, offsetV: 2.5 });
    expectNothingAboveTheLimit();
  });

  it('amplitude refused in the one batch sent with the output off: the output never comes on, and cannot until configured afresh', async () => {
    await bench.setFault('generator', { kind: 'refuse', header: '[SOURce]:VOLTage[:LEVel][:IMMediate][:AMPLitude]' });
    const error = await generator.configureSine(A).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ScpiInstrumentError);
    expect((error as ScpiInstrumentError).code).toBe(-222);
    await expect(generator.setOutput(true)).rejects.toBeInstanceOf(ValidationError);
    expect(bench.generator.held.on).toBe(false);
    expect(heldWhileOn).toEqual([]);
  });

  it('refuses an amplitude below the profile\'s minimum before sending anything', async () => {
    await startAt(A);
    const before = { ...bench.generator.held };
    await expect(generator.configureSine({ ...A, amplitudeVpp: 0.0005 })).rejects.toThrow(/below the generator's 0\.001 Vpp/);
    expect(bench.generator.held).toEqual(before);
  });
});
