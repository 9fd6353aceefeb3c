/** Which step's stimulus the generator holds and since when: shared bookkeeping of the measurers. */
import type { BenchClock } from '../../bench/clock';
import type { StepSetting, SweepInstruments } from './types';

export class AppliedStimulus {
  private step: number | undefined;
  private changedAtS = 0;
  private outputOn = false;

  constructor(private readonly clock: BenchClock) {}

  reset(): void {
    this.step = undefined;
    this.outputOn = false;
  }

  /** Sets a sine (AC) or DC level for the step and switches the output on the first time. */
  async apply(instruments: SweepInstruments, setting: StepSetting, kind: 'sine' | 'dc'): Promise<void> {
    this.step = undefined;
    if (kind === 'dc') await instruments.generator.configureDc(setting.stimulus);
    else await instruments.generator.configureSine({ frequencyHz: setting.stimulus, amplitudeVpp: setting.amplitudeVpp, offsetV: 0 });
    if (!this.outputOn) {
      await instruments.generator.setOutput(true);
      this.outputOn = true;
    }
    // Settling counts from the generator's confirmation: from its arrival where the control knows it,
    // else from now (a little later, never sooner).
    const confirmedAtMs = instruments.generator.confirmedAtMs;
    const sinceConfirmedS = confirmedAtMs === undefined || !Number.isFinite(confirmedAtMs) ? 0 : Math.max(0, performance.now() - confirmedAtMs) / 1000;
    this.changedAtS = this.clock.nowS() - sinceConfirmedS * this.clock.timeScale;
    this.step = setting.step;
  }

  /** Applies the step unless it is already applied. */
  async ensure(instruments: SweepInstruments, setting: StepSetting, kind: 'sine' | 'dc'): Promise<void> {
    if (this.step !== setting.step) await this.apply(instruments, setting, kind);
  }

  /**
   * Applies the step unless it is already applied, and meanwhile sets the measuring instrument up for it
   * (another instrument on another link, so neither waits for the other's round trips). Waits for both;
   * a failure of either is reported once both are done, the generator's first.
   */
  async ensureWhile(instruments: SweepInstruments, setting: StepSetting, kind: 'sine' | 'dc', setUp: () => Promise<void>): Promise<void> {
    // When the generator has a command to send, the set-up starts one turn of the event loop later, so that
    // command (its reply starts the settling) goes out first.
    const settingUp = this.step === setting.step ? setUp() : new Promise<void>((resolve) => setImmediate(resolve)).then(setUp);
    const results = await Promise.allSettled([this.ensure(instruments, setting, kind), settingUp]);
    for (const result of results) if (result.status === 'rejected') throw result.reason;
  }

  /** Waits until the step's settling time has passed since its stimulus was applied. */
  async settled(settleS: number): Promise<void> {
    const remainingS = this.changedAtS + settleS - this.clock.nowS();
    if (remainingS > 0) await this.clock.sleepS(remainingS);
  }
}

/**
 * Whether a new meter aperture is worth a command. Whole-cycle apertures differ
 * by fractions of a per mille between neighbouring frequencies; an aperture off
 * by 0.1 % adds at most 0.1 % of one cycle's partial sum over hundreds of cycles,
 * far below the reading's own noise, while each command costs a round trip
 * (common practice, no source).
 */
export function apertureChanged(previousS: number, wantedS: number): boolean {
  return !(Math.abs(wantedS - previousS) <= 1e-3 * wantedS);
}
