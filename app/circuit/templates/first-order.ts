/** Single-op-amp first-order stages: inverting variants, non-inverting, integrator, differentiator. */
import { capacitor, designFile, opamp, OPAMP_PARAMETERS, resistor, type DesignTemplate } from './template-kit';

// Tolerance parameters are added for the part kinds each template has (templates/index.ts).
const common = OPAMP_PARAMETERS;

export const invertingGain: DesignTemplate = {
  id: 'inverting-gain',
  title: 'Inverting gain stage',
  description: 'RN from the input to the inverting node, RF from the output back to it: gain −RF/RN.',
  parameters: [
    { name: 'rn', description: 'input resistor RN', defaultValue: 1e3, unit: 'Ω' },
    { name: 'rf', description: 'feedback resistor RF', defaultValue: 10e3, unit: 'Ω' },
    ...common,
  ],
  build: (p) =>
    designFile('Inverting gain stage', 'Generated from template inverting-gain.', [
      resistor('RN', 'in', 'inv', p.rn, p),
      resistor('RF', 'inv', 'out', p.rf, p),
      opamp('U1', '0', 'inv', 'out', p),
    ]),
};

export const invertingLowPass: DesignTemplate = {
  id: 'inverting-lowpass',
  title: 'Inverting low-pass (RF parallel CF)',
  description: 'Inverting stage with CF across RF: gain −RF/RN below the corner 1/(2π·RF·CF), −20 dB/decade above.',
  parameters: [
    { name: 'rn', description: 'input resistor RN', defaultValue: 1e3, unit: 'Ω' },
    { name: 'rf', description: 'feedback resistor RF', defaultValue: 10e3, unit: 'Ω' },
    { name: 'cf', description: 'feedback capacitor CF, across RF', defaultValue: 15e-9, unit: 'F' },
    ...common,
  ],
  build: (p) =>
    designFile('Inverting low-pass', 'Generated from template inverting-lowpass.', [
      resistor('RN', 'in', 'inv', p.rn, p),
      resistor('RF', 'inv', 'out', p.rf, p),
      capacitor('CF', 'inv', 'out', p.cf, p),
      opamp('U1', '0', 'inv', 'out', p),
    ]),
};

export const invertingHighPass: DesignTemplate = {
  id: 'inverting-highpass',
  title: 'Inverting high-pass (CN in series with RN)',
  description: 'Inverting stage with CN in series with RN: gain −RF/RN above the corner 1/(2π·RN·CN), +20 dB/decade below.',
  parameters: [
    { name: 'rn', description: 'input resistor RN', defaultValue: 1e3, unit: 'Ω' },
    { name: 'cn', description: 'input capacitor CN, in series with RN', defaultValue: 100e-9, unit: 'F' },
    { name: 'rf', description: 'feedback resistor RF', defaultValue: 10e3, unit: 'Ω' },
    ...common,
  ],
  build: (p) =>
    designFile('Inverting high-pass', 'Generated from template inverting-highpass.', [
      capacitor('CN', 'in', 'n1', p.cn, p),
      resistor('RN', 'n1', 'inv', p.rn, p),
      resistor('RF', 'inv', 'out', p.rf, p),
      opamp('U1', '0', 'inv', 'out', p),
    ]),
};

export const invertingBandPass: DesignTemplate = {
  id: 'inverting-bandpass',
  title: 'Inverting band-pass (series RN–CN in, parallel RF–CF in feedback)',
  description: 'Low corner 1/(2π·RN·CN), high corner 1/(2π·RF·CF), mid-band gain about −RF/RN.',
  parameters: [
    { name: 'rn', description: 'input resistor RN', defaultValue: 1e3, unit: 'Ω' },
    { name: 'cn', description: 'input capacitor CN, in series with RN', defaultValue: 1e-6, unit: 'F' },
    { name: 'rf', description: 'feedback resistor RF', defaultValue: 10e3, unit: 'Ω' },
    { name: 'cf', description: 'feedback capacitor CF, across RF', defaultValue: 1e-9, unit: 'F' },
    ...common,
  ],
  build: (p) =>
    designFile('Inverting band-pass', 'Generated from template inverting-bandpass.', [
      capacitor('CN', 'in', 'n1', p.cn, p),
      resistor('RN', 'n1', 'inv', p.rn, p),
      resistor('RF', 'inv', 'out', p.rf, p),
      capacitor('CF', 'inv', 'out', p.cf, p),
      opamp('U1', '0', 'inv', 'out', p),
    ]),
};

export const nonInverting: DesignTemplate = {
  id: 'non-inverting',
  title: 'Non-inverting gain stage',
  description: 'Input on the non-inverting pin, RF from the output to the inverting node, RG from there to ground: gain 1 + RF/RG.',
  parameters: [
    { name: 'rg', description: 'resistor RG, inverting node to ground', defaultValue: 1e3, unit: 'Ω' },
    { name: 'rf', description: 'feedback resistor RF', defaultValue: 9e3, unit: 'Ω' },
    ...common,
  ],
  build: (p) =>
    designFile('Non-inverting gain stage', 'Generated from template non-inverting.', [
      resistor('RG', 'inv', '0', p.rg, p),
      resistor('RF', 'inv', 'out', p.rf, p),
      opamp('U1', 'in', 'inv', 'out', p),
    ]),
};

export const practicalIntegrator: DesignTemplate = {
  id: 'integrator',
  title: 'Practical integrator (RF across CF)',
  description: 'Integrates above 1/(2π·RF·CF), where RF across CF stops the output drifting; unity gain at 1/(2π·RN·CF).',
  parameters: [
    { name: 'rn', description: 'input resistor RN', defaultValue: 10e3, unit: 'Ω' },
    { name: 'cf', description: 'integrating capacitor CF', defaultValue: 10e-9, unit: 'F' },
    { name: 'rf', description: 'resistor RF across CF (DC gain limit)', defaultValue: 1e6, unit: 'Ω' },
    ...common,
  ],
  build: (p) =>
    designFile('Practical integrator', 'Generated from template integrator.', [
      resistor('RN', 'in', 'inv', p.rn, p),
      capacitor('CF', 'inv', 'out', p.cf, p),
      resistor('RF', 'inv', 'out', p.rf, p),
      opamp('U1', '0', 'inv', 'out', p),
    ]),
};

export const practicalDifferentiator: DesignTemplate = {
  id: 'differentiator',
  title: 'Practical differentiator (RN in series with CN)',
  description: 'Differentiates below 1/(2π·RN·CN), where the series RN caps the high-frequency gain at −RF/RN; unity gain at 1/(2π·RF·CN).',
  parameters: [
    { name: 'cn', description: 'differentiating capacitor CN', defaultValue: 10e-9, unit: 'F' },
    { name: 'rn', description: 'series resistor RN (high-frequency gain limit)', defaultValue: 1e3, unit: 'Ω' },
    { name: 'rf', description: 'feedback resistor RF', defaultValue: 100e3, unit: 'Ω' },
    ...common,
  ],
  build: (p) =>
    designFile('Practical differentiator', 'Generated from template differentiator.', [
      capacitor('CN', 'in', 'n1', p.cn, p),
      resistor('RN', 'n1', 'inv', p.rn, p),
      resistor('RF', 'inv', 'out', p.rf, p),
      opamp('U1', '0', 'inv', 'out', p),
    ]),
};
