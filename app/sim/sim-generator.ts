/**
 * Simulated function generator, spoken to in SCPI-1999 terms (what the shipped
 * generator profile sends): SOURce:FUNCtion, :FREQuency, :VOLTage (a sine's
 * amplitude in peak-to-peak volts) and :VOLTage:OFFSet, OUTPut:STATe. It has
 * no load setting: the amplitude is the open-circuit voltage (EMF), behind a
 * 50 Ω source resistance between the EMF and the circuit.
 */
import type { BenchClock } from '../bench/clock';
import type { BenchModel } from './bench-model';
import { formatNr3, booleanParam, keywordParam, numberParam } from './parameters';
import { SimCommandError } from './scpi-errors';
import { SimInstrument, SIMULATED_MANUFACTURER } from './sim-instrument';
import { SOFTWARE_VERSION } from '../contract/version';

export const SIM_GENERATOR_LIMITS = { minFrequencyHz: 0.001, maxFrequencyHz: 20e6, maxOpenCircuitVpp: 20, minAmplitudeVpp: 0.001 };

export interface GeneratorSettings {
  shape: 'sine' | 'dc';
  frequencyHz: number;
  /** Sine amplitude, open-circuit Vpp. */
  amplitudeVpp: number;
  offsetV: number;
  on: boolean;
}

const POWER_ON: GeneratorSettings = { shape: 'sine', frequencyHz: 1000, amplitudeVpp: 0.1, offsetV: 0, on: false };

export class SimGenerator extends SimInstrument {
  private settings: GeneratorSettings = { ...POWER_ON };

  constructor(
    private readonly model: BenchModel,
    clock: BenchClock,
  ) {
    super({ manufacturer: SIMULATED_MANUFACTURER, model: 'simulated generator', serialNumber: 'SIM-GEN-0001', firmware: SOFTWARE_VERSION }, clock);
    const limits = SIM_GENERATOR_LIMITS;
    this.define('[SOURce]:FUNCtion[:SHAPe]', ({ params }) => {
      const shape = keywordParam(params, ['SINusoid', 'DC'] as const);
      this.update({ shape: shape === 'DC' ? 'dc' : 'sine' });
    });
    this.define('[SOURce]:FUNCtion[:SHAPe]?', () => (this.settings.shape === 'dc' ? 'DC' : 'SIN'));
    this.define('[SOURce]:FREQuency[:CW]', ({ params }) => this.update({ frequencyHz: numberParam(params, limits.minFrequencyHz, limits.maxFrequencyHz) }));
    this.define('[SOURce]:FREQuency[:CW]?', () => formatNr3(this.settings.frequencyHz));
    this.define('[SOURce]:VOLTage[:LEVel][:IMMediate][:AMPLitude]', ({ params }) => {
      const value = numberParam(params, 0, Number.MAX_VALUE);
      const amplitudeVpp = value;
      if (amplitudeVpp < SIM_GENERATOR_LIMITS.minAmplitudeVpp * (1 - 1e-9)) throw new SimCommandError('dataOutOfRange', `below ${SIM_GENERATOR_LIMITS.minAmplitudeVpp} Vpp`);
      this.checkLevels(amplitudeVpp, this.settings.offsetV);
      this.update({ amplitudeVpp });
    });
    this.define('[SOURce]:VOLTage[:LEVel][:IMMediate][:AMPLitude]?', () => formatNr3(this.settings.amplitudeVpp));
    this.define('[SOURce]:VOLTage[:LEVel][:IMMediate]:OFFSet', ({ params }) => {
      const offsetV = numberParam(params, -Number.MAX_VALUE, Number.MAX_VALUE);
      this.checkLevels(this.settings.shape === 'dc' ? 0 : this.settings.amplitudeVpp, offsetV);
      this.update({ offsetV });
    });
    this.define('[SOURce]:VOLTage[:LEVel][:IMMediate]:OFFSet?', () => formatNr3(this.settings.offsetV));
    this.define('OUTPut[:STATe]', ({ params }) => this.update({ on: booleanParam(params) }));
    this.define('OUTPut[:STATe]?', () => (this.settings.on ? '1' : '0'));
  }

  protected reset(): void {
    this.settings = { ...POWER_ON };
    this.push();
  }

  /** The instrument's own ceiling: open-circuit peak of sine plus offset within ±10 V. */
  private checkLevels(amplitudeVpp: number, offsetV: number): void {
    const peakV = amplitudeVpp / 2 + Math.abs(offsetV);
    if (peakV > SIM_GENERATOR_LIMITS.maxOpenCircuitVpp / 2 + 1e-12) throw new SimCommandError('dataOutOfRange', `output would reach ${peakV.toPrecision(4)} V peak`);
  }

  private update(change: Partial<GeneratorSettings>): void {
    this.settings = { ...this.settings, ...change };
    this.push();
    for (const listener of this.listeners) listener(this.settings);
  }

  private readonly listeners = new Set<(held: Readonly<GeneratorSettings>) => void>();

  /** What the instrument holds now (display values, as its own queries would report). */
  get held(): Readonly<GeneratorSettings> {
    return this.settings;
  }

  /** Calls `listener` with every state the instrument takes, in order (tests check each against the limit). */
  onChange(listener: (held: Readonly<GeneratorSettings>) => void): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  private push(): void {
    const s = this.settings;
    this.model.setGenerator({
      on: s.on,
      shape: s.shape,
      frequencyHz: s.frequencyHz,
      emfAmplitudeVpk: s.shape === 'sine' ? s.amplitudeVpp / 2 : 0,
      emfOffsetV: s.offsetV,
    });
  }
}
