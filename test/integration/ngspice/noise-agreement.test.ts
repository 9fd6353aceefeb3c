/**
 * Output noise density against ngspice's .noise analysis, run here.
 *
 * Both sides model the same sources. Resistors: thermal noise 4kTR at the
 * design's temperature (ngspice's own resistor noise). Op-amps: ngspice has
 * no noise parameters for a controlled source, so the netlist export
 * (app/circuit/spice-netlist.ts) builds each en and in from a 1 Ω resistor
 * carrying 1 A DC: its thermal noise √(4kT) V/√Hz plus ngspice's resistor
 * flicker noise (KF·I^AF/f with AF = 2, KF = 4kT·corner) gives
 * √(4kT·(1 + corner/f)); a noiseless VCVS (en, in series with the
 * non-inverting input) or VCCS (in, into each input pin) scales it to the
 * op-amp's density. The macro-model's internal resistors are noisy=0.
 * Tolerance 0.1 dB from 10 Hz to 1 MHz.
 */
import { describe, expect, it } from 'vitest';
import { makeDesignFromTemplate, parseDesign, solveNoise, type Design, type DesignFile, type OpAmpModel } from '../../../app/circuit';
import { ngspiceNoise } from './run-ngspice';
import { requireTool } from '../../helpers/required-tool';

const MAX_ERROR_DB = 0.1;

/** Invented op-amp noise figures (typical orders of magnitude for a bipolar-input part). */
const OPAMP_NOISE: Partial<OpAmpModel> = {
  voltageNoiseVPerRtHz: 8e-9,
  voltageNoiseCornerHz: 200,
  currentNoiseAPerRtHz: 0.6e-12,
  currentNoiseCornerHz: 2000,
};

function design(id: string, params: Record<string, number> = {}, model: Partial<OpAmpModel> = {}): Design {
  const file = makeDesignFromTemplate(id, params) as DesignFile & { parts: Array<{ type: string; model?: object }> };
  for (const part of file.parts) if (part.type === 'opamp') part.model = { ...part.model, ...model };
  return parseDesign(file, id);
}

/** An invented follower with a two-pole op-amp, 50 Ω output resistance and 1 nF load: a loop close to ringing. */
const loadedFollower = parseDesign(
  {
    name: 'two-pole follower driving 1 nF through its output resistance (invented test circuit)',
    input: 'in',
    output: 'out',
    parts: [
      { id: 'RS', type: 'resistor', nodes: ['in', 'p'], value: '10k' },
      { id: 'U1', type: 'opamp', nodes: ['p', 'out', 'out'], model: { openLoopGain: 2e5, gbw: '10meg', secondPoleHz: '30meg', outputResistanceOhm: 50, ...OPAMP_NOISE } },
      { id: 'CL', type: 'capacitor', nodes: ['out', '0'], value: '1n' },
      { id: 'RL', type: 'resistor', nodes: ['out', '0'], value: '2k' },
    ],
  },
  'loaded-follower',
);

/** An invented inverting stage with input capacitance (noise-gain peaking), bias-compensation RP and an ideal op-amp with offset and noise. */
const shapedIdealStage = parseDesign(
  {
    name: 'inverting stage with input capacitance, ideal op-amp (invented test circuit)',
    input: 'in',
    output: 'out',
    parts: [
      { id: 'RN', type: 'resistor', nodes: ['in', 'inv'], value: '10k' },
      { id: 'CN', type: 'capacitor', nodes: ['inv', '0'], value: '1n' },
      { id: 'RF', type: 'resistor', nodes: ['inv', 'out'], value: '100k' },
      { id: 'CF', type: 'capacitor', nodes: ['inv', 'out'], value: '10p' },
      { id: 'RP', type: 'resistor', nodes: ['p', '0'], value: '9.1k' },
      { id: 'U1', type: 'opamp', nodes: ['p', 'inv', 'out'], model: { ideal: true, inputOffsetV: '1m', ...OPAMP_NOISE } },
    ],
  },
  'shaped-ideal',
);

const TOPOLOGIES: Array<[string, string]> = [
  ['first-order inverting low-pass', 'inverting-lowpass'],
  ['non-inverting gain stage (gain 10)', 'non-inverting'],
  ['second-order unity-gain low-pass (Sallen–Key)', 'sallen-key-lowpass-unity'],
  ['multiple-feedback band-pass (Q = 5)', 'mfb-bandpass'],
  ['practical integrator', 'integrator'],
  ['practical differentiator', 'differentiator'],
];

const CASES: Array<[string, Design]> = [
  ...TOPOLOGIES.map(([label, id]): [string, Design] => [`${label}, resistor noise only`, design(id)]),
  ...TOPOLOGIES.map(([label, id]): [string, Design] => [`${label}, resistors + op-amp en/in with 1/f corners`, design(id, {}, OPAMP_NOISE)]),
  ['Sallen–Key low-pass at 85 °C (the temperature enters 4kTR)', parseDesign({ ...makeDesignFromTemplate('sallen-key-lowpass-unity'), temperatureC: 85 }, 'hot')],
  ['two-pole follower with output resistance and capacitive load', loadedFollower],
  ['inverting stage with input capacitance, ideal op-amp with offset, en and in on both pins', shapedIdealStage],
];

function worstErrorDb(d: Design): number {
  const reference = ngspiceNoise(d, { kind: 'noise', fromHz: 10, toHz: 1e6, pointsPerDecade: 20 });
  expect(reference.frequencyHz.length).toBe(101);
  const ours = solveNoise(d, reference.frequencyHz);
  let worst = 0;
  for (let i = 0; i < reference.frequencyHz.length; i++) {
    worst = Math.max(worst, Math.abs(20 * Math.log10(ours.outputVPerRtHz[i] / reference.outputVPerRtHz[i])));
  }
  return worst;
}

describe.skipIf(!requireTool('ngspice'))('output noise density agrees with ngspice .noise (same sources on both sides)', () => {
  it.each(CASES)('%s: within 0.1 dB from 10 Hz to 1 MHz', (_label, d) => {
    expect(worstErrorDb(d)).toBeLessThan(MAX_ERROR_DB);
  });

  it('the comparison can fail: 3 % more en in ngspice than in Rolloff is caught', () => {
    const ours = design('non-inverting', {}, OPAMP_NOISE);
    const theirs = design('non-inverting', {}, { ...OPAMP_NOISE, voltageNoiseVPerRtHz: OPAMP_NOISE.voltageNoiseVPerRtHz! * 1.03 });
    const reference = ngspiceNoise(theirs, { kind: 'noise', fromHz: 10, toHz: 1e6, pointsPerDecade: 5 });
    const computed = solveNoise(ours, reference.frequencyHz);
    // At 10 kHz en·(noise gain 11) dominates the output noise of this stage.
    const index = reference.frequencyHz.findIndex((f) => Math.abs(f - 1e4) < 1);
    expect(Math.abs(20 * Math.log10(computed.outputVPerRtHz[index] / reference.outputVPerRtHz[index]))).toBeGreaterThan(MAX_ERROR_DB);
  });
});
