/** Inputs and outputs of sweep planning. Pure data; the service fills the inputs from theory and the bench. */

/** What the plan needs to know about the circuit, supplied from app/circuit by the caller. */
export interface PlanTheory {
  /** Slowest time constant of the circuit (s), from the theory engine's poles. */
  slowestTimeConstantS: number;
  /** |H(f)| as a voltage ratio (AC) — to keep the output inside the meter's range and hit a target output. */
  gainRatioAt(frequencyHz: number): number;
  /** Largest input peak volts that keep the output linear at f (rails and slew rate, i.e. full-power bandwidth). */
  stimulusLimitVpkAt(frequencyHz: number): number;
}

/** What the plan needs to know about the instruments. */
export interface PlanInstruments {
  generator: { minFrequencyHz: number; maxFrequencyHz: number; maxAmplitudeVpp: number; minAmplitudeVpp?: number };
  /** Largest output peak volts the meter/scope input reads without overrange; undefined = no limit known. */
  measurementMaxVpk?: number;
  /** Time an instrument needs after a setting change before readings are valid (s). */
  instrumentSettleS: number;
  /** Shortest acquisition the meter or scope can make (s), e.g. the meter's aperture. */
  minIntegrationS: number;
}

export interface PlanOptions {
  /** Residual transient allowed at the start of integration, as a fraction (default 1e-3 → ln(1000) ≈ 6.9 τ). */
  settleFraction?: number;
  /** Fraction of each linearity limit actually used (default 0.8): margin for part tolerances and the model. */
  amplitudeMargin?: number;
}

/** The steps of a plan, columnar: index i of every array is one step. */
export interface PlanColumns {
  /** Hz for AC, input volts for DC. */
  stimulus: Float64Array;
  /** Generator peak-to-peak volts (AC); for DC steps 2·|level|, the peak-to-peak equivalent the limit applies to. */
  amplitudeVpp: Float64Array;
  settleS: Float64Array;
  /** Duration of one acquisition (s): whole cycles of the stimulus for AC. */
  integrateS: Float64Array;
}

export interface SweepPlan {
  kind: 'ac' | 'dc';
  columns: PlanColumns;
  averages: number;
  /** Σ (settle + averages · integrate): the physical minimum duration of the sweep (s). */
  physicalMinimumS: number;
  warnings: string[];
}
