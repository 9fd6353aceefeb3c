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
  shape: 'sine' | 'dc' | undefined;
  frequencyHz: number | undefined;
  /** What the instrument holds; undefined until we have set it (its own value is unknown). */
  amplitudeVpp: number | undefined;
  offsetV: number | undefined;
  outputOn: boolean;
}

export class ProfileGenerator implements GeneratorControl {
  readonly limits: GeneratorLimits;
  readonly maxStimulusVpp: number;
  private readonly runner: OperationRunner;
  private load: LoadSetting = 'high-z';
  // The instrument's own settings are unknown until we set them; openInstrument switches the output off first.
  private state: OutputState = { shape: undefined, frequencyHz: undefined, amplitudeVpp: undefined, offsetV: undefined, outputOn: false };

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

    await this.withOutputOffForShapeChange('sine', async () => {
      if (this.state.frequencyHz !== frequencyHz) {
        await this.runner.set('frequency', { frequencyHz });
        this.state.frequencyHz = frequencyHz;
      }
      await this.applyLevels(amplitudeVpp, offsetV);
    });
    await this.runner.flush();
  }

  async configureDc(levelV: number): Promise<void> {
    checkFinite('levelV', levelV);
    this.checkLimit(`DC level ${levelV} V`, 0, levelV, this.load);
    // The offset command sets the DC level; the sine amplitude the instrument keeps does not reach the output.
    await this.withOutputOffForShapeChange('dc', async () => {
      if (this.state.offsetV !== levelV) {
        await this.runner.set('offset', { offsetV: levelV });
        this.state.offsetV = levelV;
      }
    });
    await this.runner.flush();
  }

  async setOutput(on: boolean): Promise<void> {
    if (on && this.state.shape === undefined) {
      // Whatever the instrument was left at could exceed the limit: never switch that on.
      throw new ValidationError('setOutput', 'the generator has not been configured in this session', 'Call configureSine or configureDc before switching the output on.');
    }
    await this.runner.set(on ? 'outputOn' : 'outputOff');
    this.state.outputOn = on;
    await this.runner.flush();
  }

  async setLoad(load: LoadSetting): Promise<void> {
    // '50-ohm' doubles the open-circuit voltage of the present setting: check first.
    const amplitudeVpp = this.state.shape === 'sine' ? this.state.amplitudeVpp ?? 0 : 0;
    this.checkLimit(`switching the load setting to ${load}`, amplitudeVpp, this.state.offsetV ?? 0, load);
    await this.runner.set(load === '50-ohm' ? 'load50Ohm' : 'loadHighZ');
    await this.runner.flush();
    this.load = load;
  }

  async readFrequencyHz(): Promise<Reading> {
    const reply = await this.runner.queryText('readFrequency');
    return parseReading(reply, this.runner.describe('readFrequency'));
  }

  get loadSetting(): LoadSetting {
    return this.load;
  }

  /**
   * Changing between sine and DC exposes settings the other shape kept (a DC
   * level becomes the sine's offset, a remembered sine amplitude reappears),
   * which could exceed the limit for a moment: do it with the output off.
   */
  private async withOutputOffForShapeChange(shape: 'sine' | 'dc', configure: () => Promise<void>): Promise<void> {
    if (this.state.shape === shape) return configure();
    const wasOn = this.state.outputOn;
    if (wasOn) await this.setOutput(false);
    await this.runner.set(shape === 'sine' ? 'sineFunction' : 'dcFunction');
    this.state.shape = shape;
    await configure();
    if (wasOn) await this.setOutput(true);
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
    const offsetGrows = Math.abs(offsetV) > Math.abs(this.state.offsetV ?? 0);
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
