/** Shapes shared by the runner's parts. */
import type { GeneratorControl, MeterControl, ScopeControl } from '../../bench/roles';

/** One step as the runner executes it (planned or refinement). */
export interface StepSetting {
  step: number;
  /** Hz (AC) or input volts (DC). */
  stimulus: number;
  amplitudeVpp: number;
  settleS: number;
  /** One acquisition (whole cycles); the step makes `averages` of them. */
  integrateS: number;
  averages: number;
  refinement: boolean;
}

/** What one step produced, before it is stored. NaN where a value does not apply. */
export interface StepResult {
  gainDb: number;
  gainUncertaintyDb: number;
  phaseDeg: number;
  phaseUncertaintyDeg: number;
  outputV: number;
  inputReading: number;
  outputReading: number;
  /** PointFlag bits found while measuring (distorted, overrange, notANumber). */
  flags: number;
  /** Advice for the run's event log (a warning), e.g. to lower the amplitude. */
  advice?: string;
  /** A remark for the run's event log (information), e.g. a cross-check that passed. */
  note?: string;
}

/** The instrument controls a sweep uses; replaced wholesale after a reconnect. */
export interface SweepInstruments {
  generator: GeneratorControl;
  scope?: ScopeControl;
  meter?: MeterControl;
}

/**
 * Measures steps on the instruments. Split in three so the runner can overlap
 * link time with physics: while step k's data are read back and stored, the
 * generator already moves to step k+1 and its settling runs.
 */
export interface StepMeasurer<R = StepResult> {
  /** Called once per (re)connection before the first step; forgets any applied stimulus. */
  prepare(instruments: SweepInstruments): Promise<void>;
  /** Sets the generator to the step's stimulus and notes when (settling counts from then). */
  apply(instruments: SweepInstruments, setting: StepSetting): Promise<void>;
  /**
   * Applies the stimulus unless already applied, waits out the settling, and
   * acquires. Resolves when the stimulus is no longer needed, with a function
   * that reads back and reduces what was acquired. Given the next step, that
   * function also sends the next step's measuring-instrument settings (time
   * base, scales, aperture) once this step's data are in, so their round trips
   * overlap the reduction, the store and the next settling.
   *
   * `acquiring` is called once the acquisition command has been sent (settling
   * done, the instrument capturing): the runner stores the previous point
   * while the capture runs, so that commit never delays the start.
   */
  acquire(instruments: SweepInstruments, setting: StepSetting, acquiring: () => void): Promise<(next?: StepSetting) => Promise<R>>;
}
