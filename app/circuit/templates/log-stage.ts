/** Diode-feedback logarithmic stage. */
import { designFile, opamp, OPAMP_PARAMETERS, resistor, type DesignTemplate } from './template-kit';

export const logStage: DesignTemplate = {
  id: 'log-stage',
  title: 'Diode-feedback log stage',
  description: 'R1 from the input to the inverting node, a diode from there (anode) to the output (cathode): Vout = −(n·VT·ln(Vin/(R1·IS) + 1) + RS·Vin/R1) for positive inputs.',
  parameters: [
    { name: 'r1', description: 'input resistor R1', defaultValue: 10e3, unit: 'Ω' },
    { name: 'is', description: 'diode saturation current IS', defaultValue: 1e-14, unit: 'A' },
    { name: 'n', description: 'diode ideality factor n', defaultValue: 1, unit: '' },
    { name: 'rs', description: 'diode series resistance RS', defaultValue: 0, unit: 'Ω' },
    ...OPAMP_PARAMETERS,
  ],
  build: (p) =>
    designFile('Diode-feedback log stage', 'Generated from template log-stage.', [
      resistor('R1', 'in', 'inv', p.r1, p),
      { id: 'D1', type: 'diode', nodes: ['inv', 'out'], model: { is: p.is, n: p.n, rs: p.rs } },
      opamp('U1', '0', 'inv', 'out', p),
    ]),
};
