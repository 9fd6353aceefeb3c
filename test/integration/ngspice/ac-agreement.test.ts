/**
 * AC response against the reference simulator ngspice. Both sides use the
 * same op-amp macro-model: single pole A(s) = A0/(1 + s·A0/(2π·GBW))
 * (optionally a second pole), realised in the netlist as a 1 S
 * transconductance into A0 ohms ∥ 1/(2π·GBW) farads and a unity VCVS
 * (see app/circuit/spice-netlist.ts). Tolerance (DEVELOPERS.md "Agreement targets"): 0.01 dB, 0.1°.
 */
import { describe, expect, it } from 'vitest';
import { makeDesignFromTemplate, parseDesign, solveAc, type Design } from '../../../app/circuit';
import { dbFromRatio, degreesFromRadians, wrapPhaseDeg } from '../../../app/units';
import { ngspiceAc } from './run-ngspice';
import { requireTool } from '../../helpers/required-tool';

const MAX_GAIN_ERROR_DB = 0.01;
const MAX_PHASE_ERROR_DEG = 0.1;

function fromTemplate(id: string, params: Record<string, number> = {}): Design {
  return parseDesign(makeDesignFromTemplate(id, params), id);
}

/** An invented circuit with an inductor and a two-pole op-amp: RLC band-pass into a gain-of-2 stage. */
const rlcIntoTwoPoleStage = parseDesign(
  {
    name: 'RLC band-pass into a two-pole non-inverting stage (invented test circuit)',
    input: 'in',
    output: 'out',
    parts: [
      { id: 'R1', type: 'resistor', nodes: ['in', 'a'], value: '1k' },
      { id: 'L1', type: 'inductor', nodes: ['a', 'b'], value: '10m' },
      { id: 'C1', type: 'capacitor', nodes: ['b', 'gnd'], value: '100n' },
      { id: 'R2', type: 'resistor', nodes: ['b', '0'], value: '2k' },
      { id: 'RG', type: 'resistor', nodes: ['inv', '0'], value: '10k' },
      { id: 'RF', type: 'resistor', nodes: ['inv', 'out'], value: '10k' },
      { id: 'U1', type: 'opamp', nodes: ['b', 'inv', 'out'], model: { openLoopGain: 2e5, gbw: '3meg', secondPoleHz: '5meg' } },
    ],
  },
  'rlc-two-pole',
);

const CASES: Array<[string, Design]> = [
  ['first-order inverting low-pass, finite GBW', fromTemplate('inverting-lowpass')],
  ['first-order inverting high-pass, finite GBW', fromTemplate('inverting-highpass')],
  ['non-inverting gain stage (gain 10)', fromTemplate('non-inverting')],
  ['practical integrator', fromTemplate('integrator')],
  ['second-order unity-gain low-pass (Sallen–Key)', fromTemplate('sallen-key-lowpass-unity')],
  ['second-order equal-component high-pass (Sallen–Key)', fromTemplate('sallen-key-highpass-equal')],
  ['multiple-feedback band-pass (Q = 5)', fromTemplate('mfb-bandpass')],
  ['inverting band-pass', fromTemplate('inverting-bandpass')],
  ['practical differentiator', fromTemplate('differentiator')],
  ['RLC band-pass into a two-pole op-amp stage', rlcIntoTwoPoleStage],
];

describe.skipIf(!requireTool('ngspice'))('AC response agrees with ngspice (same op-amp macro-model on both sides)', () => {
  it.each(CASES)('%s: within 0.01 dB and 0.1° from 10 Hz to 1 MHz', (_label, design) => {
    const reference = ngspiceAc(design, { kind: 'ac', fromHz: 10, toHz: 1e6, pointsPerDecade: 20 });
    expect(reference.frequencyHz.length).toBe(101);
    const ours = solveAc(design, reference.frequencyHz);
    let worstGainDb = 0;
    let worstPhaseDeg = 0;
    for (let i = 0; i < reference.frequencyHz.length; i++) {
      const referenceGainDb = dbFromRatio(Math.hypot(reference.re[i], reference.im[i]));
      const referencePhaseDeg = degreesFromRadians(Math.atan2(reference.im[i], reference.re[i]));
      worstGainDb = Math.max(worstGainDb, Math.abs(ours.gainDb[i] - referenceGainDb));
      worstPhaseDeg = Math.max(worstPhaseDeg, Math.abs(wrapPhaseDeg(ours.phaseDeg[i] - referencePhaseDeg)));
    }
    expect(worstGainDb).toBeLessThan(MAX_GAIN_ERROR_DB);
    expect(worstPhaseDeg).toBeLessThan(MAX_PHASE_ERROR_DEG);
  });

  it('the comparison can fail: a 1 % change in one resistor is caught', () => {
    const design = fromTemplate('inverting-lowpass');
    const reference = ngspiceAc(design, { kind: 'ac', fromHz: 10, toHz: 1e6, pointsPerDecade: 5 });
    const altered = fromTemplate('inverting-lowpass', { rf: 10.1e3 });
    const ours = solveAc(altered, reference.frequencyHz);
    const referenceGainDb = dbFromRatio(Math.hypot(reference.re[0], reference.im[0]));
    expect(Math.abs(ours.gainDb[0] - referenceGainDb)).toBeGreaterThan(MAX_GAIN_ERROR_DB);
  });
});
