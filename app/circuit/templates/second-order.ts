/**
 * Second-order stages: Sallen–Key (unity-gain and equal-component, low- and
 * high-pass) and the multiple-feedback band-pass. The f0 and Q in each
 * description are what test/unit/circuit checks against the solver.
 */
import { capacitor, designFile, opamp, OPAMP_PARAMETERS, resistor, type DesignTemplate } from './template-kit';

// Tolerance parameters are added for the part kinds each template has (templates/index.ts).
const common = OPAMP_PARAMETERS;

export const sallenKeyLowPassUnity: DesignTemplate = {
  id: 'sallen-key-lowpass-unity',
  title: 'Sallen–Key low-pass, unity gain',
  description: 'R1, R2 in series to the follower input; C1 from their junction to the output, C2 to ground. f0 = 1/(2π√(R1R2C1C2)), Q = √(R1R2C1C2)/(C2(R1+R2)).',
  parameters: [
    { name: 'r1', description: 'first series resistor R1', defaultValue: 10e3, unit: 'Ω' },
    { name: 'r2', description: 'second series resistor R2', defaultValue: 10e3, unit: 'Ω' },
    { name: 'c1', description: 'feedback capacitor C1 (junction to output)', defaultValue: 20e-9, unit: 'F' },
    { name: 'c2', description: 'capacitor C2 (follower input to ground)', defaultValue: 10e-9, unit: 'F' },
    ...common,
  ],
  build: (p) =>
    designFile('Sallen–Key low-pass, unity gain', 'Generated from template sallen-key-lowpass-unity.', [
      resistor('R1', 'in', 'a', p.r1, p),
      resistor('R2', 'a', 'b', p.r2, p),
      capacitor('C1', 'a', 'out', p.c1, p),
      capacitor('C2', 'b', '0', p.c2, p),
      opamp('U1', 'b', 'out', 'out', p),
    ]),
};

export const sallenKeyHighPassUnity: DesignTemplate = {
  id: 'sallen-key-highpass-unity',
  title: 'Sallen–Key high-pass, unity gain',
  description: 'C1, C2 in series to the follower input; R1 from their junction to the output, R2 to ground. f0 = 1/(2π√(R1R2C1C2)), Q = √(R1R2C1C2)/(R1(C1+C2)).',
  parameters: [
    { name: 'c1', description: 'first series capacitor C1', defaultValue: 10e-9, unit: 'F' },
    { name: 'c2', description: 'second series capacitor C2', defaultValue: 10e-9, unit: 'F' },
    { name: 'r1', description: 'feedback resistor R1 (junction to output)', defaultValue: 10e3, unit: 'Ω' },
    { name: 'r2', description: 'resistor R2 (follower input to ground)', defaultValue: 20e3, unit: 'Ω' },
    ...common,
  ],
  build: (p) =>
    designFile('Sallen–Key high-pass, unity gain', 'Generated from template sallen-key-highpass-unity.', [
      capacitor('C1', 'in', 'a', p.c1, p),
      capacitor('C2', 'a', 'b', p.c2, p),
      resistor('R1', 'a', 'out', p.r1, p),
      resistor('R2', 'b', '0', p.r2, p),
      opamp('U1', 'b', 'out', 'out', p),
    ]),
};

const equalComponentGain = [
  { name: 'rg', description: 'gain-setting resistor RG, inverting node to ground', defaultValue: 10e3, unit: 'Ω' },
  { name: 'rf', description: 'gain-setting resistor RF, output to inverting node (K = 1 + RF/RG)', defaultValue: 5.86e3, unit: 'Ω' },
];

export const sallenKeyLowPassEqual: DesignTemplate = {
  id: 'sallen-key-lowpass-equal',
  title: 'Sallen–Key low-pass, equal components',
  description: 'Both resistors R and both capacitors C equal, gain K = 1 + RF/RG sets Q: f0 = 1/(2π·R·C), Q = 1/(3 − K).',
  parameters: [
    { name: 'r', description: 'both series resistors R', defaultValue: 10e3, unit: 'Ω' },
    { name: 'c', description: 'both capacitors C', defaultValue: 10e-9, unit: 'F' },
    ...equalComponentGain,
    ...common,
  ],
  build: (p) =>
    designFile('Sallen–Key low-pass, equal components', 'Generated from template sallen-key-lowpass-equal.', [
      resistor('R1', 'in', 'a', p.r, p),
      resistor('R2', 'a', 'b', p.r, p),
      capacitor('C1', 'a', 'out', p.c, p),
      capacitor('C2', 'b', '0', p.c, p),
      resistor('RG', 'inv', '0', p.rg, p),
      resistor('RF', 'inv', 'out', p.rf, p),
      opamp('U1', 'b', 'inv', 'out', p),
    ]),
};

export const sallenKeyHighPassEqual: DesignTemplate = {
  id: 'sallen-key-highpass-equal',
  title: 'Sallen–Key high-pass, equal components',
  description: 'Both capacitors C and both resistors R equal, gain K = 1 + RF/RG sets Q: f0 = 1/(2π·R·C), Q = 1/(3 − K).',
  parameters: [
    { name: 'r', description: 'both resistors R', defaultValue: 10e3, unit: 'Ω' },
    { name: 'c', description: 'both series capacitors C', defaultValue: 10e-9, unit: 'F' },
    ...equalComponentGain,
    ...common,
  ],
  build: (p) =>
    designFile('Sallen–Key high-pass, equal components', 'Generated from template sallen-key-highpass-equal.', [
      capacitor('C1', 'in', 'a', p.c, p),
      capacitor('C2', 'a', 'b', p.c, p),
      resistor('R1', 'a', 'out', p.r, p),
      resistor('R2', 'b', '0', p.r, p),
      resistor('RG', 'inv', '0', p.rg, p),
      resistor('RF', 'inv', 'out', p.rf, p),
      opamp('U1', 'b', 'inv', 'out', p),
    ]),
};

export const multipleFeedbackBandPass: DesignTemplate = {
  id: 'mfb-bandpass',
  title: 'Multiple-feedback band-pass',
  description:
    'R1 from the input to node a, R2 from a to ground, C1 from a to the inverting node, C2 from a to the output, R3 from the output to the inverting node. ' +
    'f0 = (1/2π)·√((R1+R2)/(R1·R2·R3·C1·C2)), Q = 2π·f0·R3·C1·C2/(C1+C2), centre gain −R3·C1/(R1·(C1+C2)).',
  parameters: [
    { name: 'r1', description: 'input resistor R1', defaultValue: 80e3, unit: 'Ω' },
    { name: 'r2', description: 'resistor R2, node a to ground', defaultValue: 1.6e3, unit: 'Ω' },
    { name: 'r3', description: 'feedback resistor R3', defaultValue: 160e3, unit: 'Ω' },
    { name: 'c1', description: 'capacitor C1, node a to inverting node', defaultValue: 10e-9, unit: 'F' },
    { name: 'c2', description: 'capacitor C2, node a to output', defaultValue: 10e-9, unit: 'F' },
    ...common,
  ],
  build: (p) =>
    designFile('Multiple-feedback band-pass', 'Generated from template mfb-bandpass.', [
      resistor('R1', 'in', 'a', p.r1, p),
      resistor('R2', 'a', '0', p.r2, p),
      capacitor('C1', 'a', 'inv', p.c1, p),
      capacitor('C2', 'a', 'out', p.c2, p),
      resistor('R3', 'inv', 'out', p.r3, p),
      opamp('U1', '0', 'inv', 'out', p),
    ]),
};
