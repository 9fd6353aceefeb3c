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
  /** Advice for the run's event log, e.g. to lower the amplitude. */
  advice?: string;
}

/** The instrument controls a sweep uses; replaced wholesale after a reconnect. */
export interface SweepInstruments {
  generator: GeneratorControl;
  scope?: ScopeControl;
  meter?: MeterControl;
}

/** Measures one step on the instruments after the generator has been set and settled. */
export interface StepMeasurer {
  /** Called once per (re)connection before the first step. */
  prepare(instruments: SweepInstruments): Promise<void>;
  /** Sets the stimulus, waits for settling and integration, reads and reduces. */
  measure(instruments: SweepInstruments, setting: StepSetting): Promise<StepResult>;
}
