/**
 * The maximum stimulus as a setting of each bench, kept in the store under the
 * bench's key (app/bench/bench-key.ts). The limit in force is always the one
 * of the bench the service drives: entering another bench (the simulated one,
 * real instruments, the bench of a run being resumed) loads that bench's own
 * limit, or none. A limit is never taken from a run, another bench, or the
 * simulated bench for real instruments.
 *
 * A limit given before any bench is known (--max-stimulus of a command that
 * decides its bench later, the Bench view before anything is connected) waits
 * and is saved for the first bench entered.
 */
import { ValidationError } from '../errors';
import { benchKey, sameBench } from '../bench/bench-key';
import type { BenchIdentity, StimulusLimit } from '../contract/contract';
import type { BenchSettingsStore } from '../store/store-interface';

/** A positive, finite peak-to-peak amplitude, or a ValidationError naming where it came from. */
export function checkMaxStimulusVpp(maxStimulusVpp: number, where = 'maximum stimulus'): number {
  if (!(Number.isFinite(maxStimulusVpp) && maxStimulusVpp > 0)) {
    throw new ValidationError(where, `${maxStimulusVpp} Vpp is not a positive amplitude`, 'Give the largest peak-to-peak voltage the circuit may see, e.g. 2.');
  }
  return maxStimulusVpp;
}

export class StimulusLimits {
  private inForce: StimulusLimit | undefined;
  private bench: BenchIdentity | undefined;
  private waiting: number | undefined;

  constructor(
    private readonly store: BenchSettingsStore,
    /** Given before the bench is known: saved for the first bench entered. */
    givenVpp: number | undefined,
  ) {
    this.waiting = givenVpp === undefined ? undefined : checkMaxStimulusVpp(givenVpp);
  }

  /** The limit in force, with its bench and when it was set. */
  get current(): StimulusLimit | undefined {
    return this.inForce;
  }

  /** The bench whose limit is in force (entered last). */
  get currentBench(): BenchIdentity | undefined {
    return this.bench;
  }

  /** The ceiling to apply now: the bench's, or one given while no bench is known yet. */
  get maxStimulusVpp(): number | undefined {
    return this.inForce?.maxStimulusVpp ?? this.waiting;
  }

  /**
   * Makes `bench`'s limit the one in force: a limit waiting for a bench is
   * saved as this bench's; otherwise the bench's stored limit, if it has one.
   */
  async enter(bench: BenchIdentity): Promise<StimulusLimit | undefined> {
    if (sameBench(this.bench, bench)) return this.inForce;
    this.bench = bench;
    if (this.waiting !== undefined) {
      const vpp = this.waiting;
      this.waiting = undefined;
      return this.save(bench, vpp);
    }
    this.inForce = await this.storedFor(bench);
    return this.inForce;
  }

  /** Sets the limit of the bench in force (saved), or, before any bench is known, of the first one entered. */
  async set(maxStimulusVpp: number): Promise<StimulusLimit | undefined> {
    checkMaxStimulusVpp(maxStimulusVpp);
    if (!this.bench) {
      this.waiting = maxStimulusVpp;
      return undefined;
    }
    return this.save(this.bench, maxStimulusVpp);
  }

  /** A bench's stored limit, without entering it. */
  async storedFor(bench: BenchIdentity): Promise<StimulusLimit | undefined> {
    const settings = await this.store.getBenchSettings(benchKey(bench));
    if (!settings || settings.maxStimulusVpp === null) return undefined;
    return { maxStimulusVpp: settings.maxStimulusVpp, bench, setAt: settings.updatedAt, reused: true };
  }

  private async save(bench: BenchIdentity, maxStimulusVpp: number): Promise<StimulusLimit> {
    const saved = await this.store.saveBenchSettings(benchKey(bench), { maxStimulusVpp });
    this.inForce = { maxStimulusVpp, bench, setAt: saved.updatedAt, reused: false };
    return this.inForce;
  }
}
