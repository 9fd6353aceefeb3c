/**
 * GeneratorControl over a profile. This is the single place the user's
 * maximum stimulus is enforced: every setting is checked before any byte is
 * sent, and amplitude/offset changes are ordered so no intermediate state
 * exceeds the limit either. With the output on, each change is confirmed by
 * the instrument (its error queue) before the next goes out, and the state
 * counts as applied only for what was confirmed: an instrument that refuses
 * the first of two changes never receives the second. With the output
 * confirmed off nothing reaches the circuit, so the changes of one configure
 * go out as one batch with one confirmation (a round trip instead of one per
 * change); the output is switched on only after that confirmation. After any
 * refusal the generator is driven to a safe state — output off, then the
 * smallest amplitude and no offset — before anything else is sent, and must
 * be configured afresh.
 */
import { ValidationError } from '../errors';
import type { ScpiSession } from '../scpi/session';
import type { Reading } from '../scpi/reading';
import { parseReading } from '../scpi/reading';
import { ScpiMalformedReplyError } from '../scpi/errors';
import { GeneratorOutputOnError, StimulusLimitError } from './errors';
import { OperationRunner } from './operation';
import type { GeneratorProfile } from './profile';
import type { GeneratorControl, GeneratorLimits, LoadSetting, OutputOffCheck, SineSetting } from './roles';
import { amplitudeInUnit, worstCaseStimulusVpp } from './stimulus';

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
  readonly sourceImpedanceOhm: number;
  private readonly runner: OperationRunner;
  private load: LoadSetting = 'high-z';
  // The instrument's own settings are unknown until we set them; openInstrument switches the output off first.
  private state: OutputState = { shape: undefined, frequencyHz: undefined, amplitudeVpp: undefined, offsetV: undefined, outputOn: false };
  /** The instrument has confirmed its output off, and nothing has switched it on since (batching relies on it). */
  private offConfirmed = false;

  constructor(
    private readonly session: ScpiSession,
    private readonly profile: GeneratorProfile,
    options: GeneratorOptions,
  ) {
    if (!(options.maxStimulusVpp > 0) || !Number.isFinite(options.maxStimulusVpp)) {
      throw new ValidationError('maxStimulusVpp', `${options.maxStimulusVpp} is not a positive number of volts`, 'Set the maximum stimulus (e.g. --max-stimulus 2).');
    }
    this.maxStimulusVpp = options.maxStimulusVpp;
    this.limits = profile.generator.limits;
    this.sourceImpedanceOhm = profile.generator.sourceImpedanceOhm;
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
    if (amplitudeVpp < this.limits.minAmplitudeVpp) {
      throw new ValidationError('amplitudeVpp', `${amplitudeVpp} Vpp is below the generator's ${this.limits.minAmplitudeVpp} Vpp (profile ${this.profile.id})`);
    }
    if (amplitudeVpp > this.limits.maxAmplitudeVpp) {
      throw new ValidationError('amplitudeVpp', `${amplitudeVpp} Vpp is above the generator's ${this.limits.maxAmplitudeVpp} Vpp (profile ${this.profile.id})`);
    }
    this.checkLimit('this sine setting', amplitudeVpp, offsetV, this.load);

    await this.withOutputOffForShapeChange('sine', async () => {
      if (this.state.frequencyHz !== frequencyHz) await this.change('frequency', { frequencyHz }, { frequencyHz });
      await this.applyLevels(amplitudeVpp, offsetV);
    });
  }

  async configureDc(levelV: number): Promise<void> {
    checkFinite('levelV', levelV);
    this.checkLimit(`DC level ${levelV} V`, 0, levelV, this.load);
    // The offset command sets the DC level; the sine amplitude the instrument keeps does not reach the output.
    await this.withOutputOffForShapeChange('dc', async () => {
      if (this.state.offsetV !== levelV) await this.change('offset', { offsetV: levelV }, { offsetV: levelV });
    });
  }

  async setOutput(on: boolean): Promise<void> {
    if (on && this.state.shape === undefined) {
      // Whatever the instrument was left at could exceed the limit: never switch that on.
      throw new ValidationError('setOutput', 'the generator has not been configured in this session', 'Call configureSine or configureDc before switching the output on.');
    }
    await this.runner.set(on ? 'outputOn' : 'outputOff');
    await this.confirm({ outputOn: on });
    this.offConfirmed = !on;
  }

  async holdOff(): Promise<OutputOffCheck> {
    const smallestVpp = this.limits.minAmplitudeVpp;
    this.checkLimit('the quiet setting (smallest amplitude, no offset)', smallestVpp, 0, this.load);
    await this.setOutput(false);
    await this.applyLevels(smallestVpp, 0);
    if (!this.runner.has('readOutput')) return 'commanded';
    const command = this.runner.describe('readOutput');
    const reply = (await this.runner.queryText('readOutput')).trim();
    // OUTPut[:STATe]? answers 1 or 0 (SCPI-1999 Vol. 1 §7.3 boolean response data, recalled from memory); ON/OFF accepted too.
    if (/^(0|OFF)$/i.test(reply)) return 'read back';
    if (/^(1|ON)$/i.test(reply)) throw new GeneratorOutputOnError(command, reply);
    throw new ScpiMalformedReplyError(command, reply, '1 or 0 (ON or OFF)');
  }

  async setLoad(load: LoadSetting): Promise<void> {
    if (this.profile.generator.load === 'none') {
      // No load setting: the amplitude is the open-circuit voltage, which is what 'high-z' means.
      if (load === '50-ohm') {
        throw new ValidationError('load', `profile ${this.profile.id} has no load setting (generator.load "none"): its amplitude is the open-circuit voltage`, 'Use the high-impedance load setting, or a profile whose generator.load is "calibrated".');
      }
      this.load = load;
      return;
    }
    // '50-ohm' doubles the open-circuit voltage of the present setting: check first.
    const amplitudeVpp = this.state.shape === 'sine' ? this.state.amplitudeVpp ?? 0 : 0;
    this.checkLimit(`switching the load setting to ${load}`, amplitudeVpp, this.state.offsetV ?? 0, load);
    await this.runner.set(load === '50-ohm' ? 'load50Ohm' : 'loadHighZ');
    await this.confirm({});
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
    if (this.state.shape === shape) return this.oneBatchWhileOff(configure);
    const wasOn = this.state.outputOn;
    if (wasOn) await this.setOutput(false);
    await this.oneBatchWhileOff(async () => {
      await this.change(shape === 'sine' ? 'sineFunction' : 'dcFunction', {}, { shape });
      await configure();
    });
    if (wasOn) await this.setOutput(true);
  }

  /** A configure's changes collected here go out at its end as one batch, confirmed once (output confirmed off only). */
  private batch: Partial<OutputState> | undefined;

  /**
   * Runs `configure` with its changes batched when the output is confirmed off: nothing reaches the circuit
   * then, whatever order the instrument takes them in or whichever it refuses, and the state counts as
   * applied only once the whole batch is confirmed. With the output on (or unknown) each change is
   * confirmed as it is made.
   */
  private async oneBatchWhileOff(configure: () => Promise<void>): Promise<void> {
    if (!this.offConfirmed || this.batch) return configure();
    this.batch = {};
    let applied: Partial<OutputState>;
    try {
      await configure();
      applied = this.batch;
    } catch (error) {
      this.runner.discardUnsent();
      throw error;
    } finally {
      this.batch = undefined;
    }
    if (Object.keys(applied).length > 0) await this.confirm(applied);
  }

  /** One setting: confirmed now, or, inside a batch, with the batch. */
  private async change(name: string, values: Record<string, number>, applied: Partial<OutputState>): Promise<void> {
    await this.runner.set(name, values);
    if (this.batch) Object.assign(this.batch, applied);
    else await this.confirm(applied);
  }

  /** Applies amplitude and offset, decreases first, so each intermediate state is within old or new. */
  private async applyLevels(amplitudeVpp: number, offsetV: number): Promise<void> {
    const setAmplitude = async () => {
      if (this.state.amplitudeVpp === amplitudeVpp) return;
      await this.change('amplitude', { amplitude: amplitudeInUnit(amplitudeVpp, this.profile.generator.amplitudeUnit) }, { amplitudeVpp });
    };
    const setOffset = async () => {
      if (this.state.offsetV !== offsetV) await this.change('offset', { offsetV }, { offsetV });
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

  /**
   * Sends what is collected and waits for the instrument's confirmation; only
   * then does `applied` count as the instrument's state. On a refusal (or a
   * lost reply) the state is unknown: drive to the safe state, then report.
   */
  private async confirm(applied: Partial<OutputState>): Promise<void> {
    try {
      await this.runner.flush();
    } catch (error) {
      await this.driveToSafeState();
      throw error;
    }
    this.state = { ...this.state, ...applied };
    // The flush's last reply is this confirmation (one exchange at a time on the session); a later reply
    // in between would only make the moment later.
    this.confirmedAtMs = this.session.lastReplyAtMs;
  }

  confirmedAtMs: number | undefined;

  /**
   * Output off first (whatever the levels are, nothing then reaches the
   * circuit), then the smallest amplitude and no offset, each confirmed. What
   * could not be confirmed stays unknown, and the output cannot be switched on
   * again until the generator is configured afresh.
   */
  private async driveToSafeState(): Promise<void> {
    this.state = { shape: undefined, frequencyHz: undefined, amplitudeVpp: undefined, offsetV: undefined, outputOn: true };
    this.offConfirmed = false;
    const attempt = async (send: () => Promise<void>, applied: Partial<OutputState>) => {
      try {
        await send();
        await this.runner.flush();
        this.state = { ...this.state, ...applied };
        return true;
      } catch {
        return false; // left unknown; the next configure sets it with the output off
      }
    };
    this.offConfirmed = await attempt(() => this.runner.set('outputOff'), { outputOn: false });
    const smallestVpp = this.limits.minAmplitudeVpp;
    const amplitude = amplitudeInUnit(smallestVpp, this.profile.generator.amplitudeUnit);
    await attempt(() => this.runner.set('amplitude', { amplitude }), { amplitudeVpp: smallestVpp });
    await attempt(() => this.runner.set('offset', { offsetV: 0 }), { offsetV: 0 });
  }

  private checkLimit(what: string, amplitudeVpp: number, offsetV: number, load: LoadSetting): void {
    const worstVpp = worstCaseStimulusVpp(amplitudeVpp, offsetV, load);
    if (worstVpp > this.maxStimulusVpp * (1 + 1e-12)) throw new StimulusLimitError(what, worstVpp, this.maxStimulusVpp);
  }
}

function checkFinite(where: string, value: number): void {
  if (typeof value !== 'number' || !Number.isFinite(value)) throw new ValidationError(where, `${value} is not a finite number`);
}
