/**
 * GeneratorControl over a profile. This is the single place the user's
 * maximum stimulus is enforced: every setting is checked before any byte is
 * sent, and amplitude/offset changes are ordered so no intermediate state
 * exceeds the limit either.
 */
import { ValidationError } from '../errors';
import type { ScpiSession } from '../scpi/session';
import type { Reading } from '../scpi/reading';
import { parseReading } from '../scpi/reading';
import { StimulusLimitError } from './errors';
import { OperationRunner } from './operation';
import type { GeneratorProfile } from './profile';
import type { GeneratorControl, GeneratorLimits, LoadSetting, SineSetting } from './roles';
import { vrmsFromVpp, worstCaseStimulusVpp } from './stimulus';

export interface GeneratorOptions {
  /** The user's ceiling, peak-to-peak volts (open circuit, |offset| counted as peak). */
  maxStimulusVpp: number;
}

interface OutputState {
  function: 'sine' | 'dc' | undefined;
  frequencyHz: number | undefined;
  amplitudeVpp: number;
  offsetV: number;
}

export class ProfileGenerator implements GeneratorControl {
  readonly limits: GeneratorLimits;
  readonly maxStimulusVpp: number;
  private readonly runner: OperationRunner;
  private load: LoadSetting = 'high-z';
  // Until we have set them, assume the instrument's own amplitude/offset are 0 (output is switched off at open).
  private state: OutputState = { function: undefined, frequencyHz: undefined, amplitudeVpp: 0, offsetV: 0 };

  constructor(
    private readonly session: ScpiSession,
    private readonly profile: GeneratorProfile,
    options: GeneratorOptions,
  ) {
    if (!(options.maxStimulusVpp > 0) || !Number.isFinite(options.maxStimulusVpp)) {
      throw new ValidationError('maxStimulusVpp', `${options.maxStimulusVpp} is not a positive number of volts`, 'Set the maximum stimulus amplitude (e.g. --max-amplitude 2).');
    }
    this.maxStimulusVpp = options.maxStimulusVpp;
    this.limits = profile.generator.limits;
    this.runner = new OperationRunner(session, profile);
  }

  async configureSine(setting: SineSetting): Promise<void> {
    const { frequencyHz, amplitudeVpp, offsetV } = setting;
    checkFinite('frequencyHz', frequencyHz);
    checkFinite('amplitudeVpp', amplitudeVpp);
    checkFinite('offsetV', offsetV);
    if (frequencyHz < this.limits.minFrequencyHz || frequencyHz > this.limits.maxFrequencyHz) {
      throw new ValidationError('frequencyHz', `${frequencyHz} Hz is outside the generator's range ${this.limits.minFrequencyHz}–${this.limits.maxFrequencyHz} Hz (profile ${this.profile.id})`);
    }
    if (amplitudeVpp < 0) throw new ValidationError('amplitudeVpp', 'must not be negative');
    if (amplitudeVpp > this.limits.maxAmplitudeVpp) {
      throw new ValidationError('amplitudeVpp', `${amplitudeVpp} Vpp is above the generator's ${this.limits.maxAmplitudeVpp} Vpp (profile ${this.profile.id})`);
    }
    this.checkLimit('this sine setting', amplitudeVpp, offsetV, this.load);

    if (this.state.function !== 'sine') {
      await this.runner.set('sineFunction');
      this.state.function = 'sine';
    }
    if (this.state.frequencyHz !== frequencyHz) {
      await this.runner.set('frequency', { frequencyHz });
      this.state.frequencyHz = frequencyHz;
    }
    await this.applyLevels(amplitudeVpp, offsetV);
  }

  async configureDc(levelV: number): Promise<void> {
    checkFinite('levelV', levelV);
    this.checkLimit(`DC level ${levelV} V`, 0, levelV, this.load);
    if (this.state.function !== 'dc') {
      // Amplitude is meaningless for DC; the offset command sets the level.
      await this.runner.set('dcFunction');
      this.state.function = 'dc';
      this.state.amplitudeVpp = 0;
    }
    if (this.state.offsetV !== levelV) {
      await this.runner.set('offset', { offsetV: levelV });
      this.state.offsetV = levelV;
    }
  }

  async setOutput(on: boolean): Promise<void> {
    await this.runner.set(on ? 'outputOn' : 'outputOff');
  }

  async setLoad(load: LoadSetting): Promise<void> {
    // '50-ohm' doubles the open-circuit voltage of the present setting: check first.
    this.checkLimit(`switching the load setting to ${load}`, this.state.amplitudeVpp, this.state.offsetV, load);
    await this.runner.set(load === '50-ohm' ? 'load50Ohm' : 'loadHighZ');
    this.load = load;
  }

  async readFrequencyHz(): Promise<Reading> {
    const reply = await this.runner.queryText('readFrequency');
    return parseReading(reply, this.runner.describe('readFrequency'));
  }

  get loadSetting(): LoadSetting {
    return this.load;
  }

  /** Applies amplitude and offset, decreases first, so each intermediate state is within old or new. */
  private async applyLevels(amplitudeVpp: number, offsetV: number): Promise<void> {
    const setAmplitude = async () => {
      if (this.state.amplitudeVpp === amplitudeVpp) return;
      const amplitude = this.profile.generator.amplitudeUnit === 'Vrms' ? vrmsFromVpp(amplitudeVpp) : amplitudeVpp;
      await this.runner.set('amplitude', { amplitude });
      this.state.amplitudeVpp = amplitudeVpp;
    };
    const setOffset = async () => {
      if (this.state.offsetV === offsetV) return;
      await this.runner.set('offset', { offsetV });
      this.state.offsetV = offsetV;
    };
    const offsetGrows = Math.abs(offsetV) > Math.abs(this.state.offsetV);
    if (offsetGrows) {
      await setAmplitude();
      await setOffset();
    } else {
      await setOffset();
      await setAmplitude();
    }
  }

  private checkLimit(what: string, amplitudeVpp: number, offsetV: number, load: LoadSetting): void {
    const worstVpp = worstCaseStimulusVpp(amplitudeVpp, offsetV, load);
    if (worstVpp > this.maxStimulusVpp * (1 + 1e-12)) throw new StimulusLimitError(what, worstVpp, this.maxStimulusVpp);
  }
}

function checkFinite(where: string, value: number): void {
  if (typeof value !== 'number' || !Number.isFinite(value)) throw new ValidationError(where, `${value} is not a finite number`);
}
