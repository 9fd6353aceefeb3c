/**
 * The circuit theory engine (pure): design model, AC and DC solvers, op-amp
 * and diode models, tolerance analysis, templates and SPICE export.
 *
 * Noise and stability (columnar, per frequency):
 * - solveNoise(design, frequenciesHz) → output density (V/√Hz), per-source
 *   contributions (resistors 4kTR, op-amp en and in with 1/f corners), the
 *   input-referred density and |gain|;
 * - bandNoise(design, fromHz, toHz) → RMS output noise over a band, total and
 *   per source; rmsFromDensity(f, density) integrates any density column;
 * - analyzeStability(design) → per op-amp crossover, phase margin, gain
 *   margin, closed-loop peaking; stabilityWarnings(result, limitDeg) → named
 *   warnings ('low-phase-margin') with a plain message; loopGainColumns for plots.
 */
export type { Design, Part, PartType, PassivePart, DiodePart, OpAmpPart, OpAmpModel, DiodeModel } from './types';
export { isGroundNode } from './types';
export { DesignError, SingularCircuitError, DcConvergenceError } from './design-error';
export { parseDesign, type ParseDesignOptions } from './parse-design';
export { withActualValues } from './actual-values';
export { solveAc, gainRatioFunction, transferFunction, type AcResponse, type AcOptions, type OpAmpAcColumns } from './solve-ac';
export { summarizeAc, type AcSummary } from './summarize-ac';
export { maxUndistortedOutputVpk, stimulusLimitVpk } from './output-limits';
export { solveDcTransfer, type DcTransfer } from './solve-dc';
export { logStageIdeal } from './log-stage';
export { thermalVoltageV, BOLTZMANN_J_PER_K, ELEMENTARY_CHARGE_C } from './thermal-voltage';
export { monteCarloAc, TOLERANCE_BAND_SETTINGS, type MonteCarloOptions, type MonteCarloBand, type ToleranceDistribution } from './monte-carlo';
export { slowestTimeConstantS, circuitPoles, type Poles } from './time-constant';
export { TEMPLATES, makeDesignFromTemplate, templateParameterText, type DesignFile } from './templates';
export { toSpiceNetlist, spiceNames, type SpiceAnalysis, type SpiceOptions, type SpiceNames } from './spice-netlist';
export { openLoopGainAt } from './opamp-gain';
export { outputOpAmpIndex } from './output-opamp';
export { inputResistor } from './input-resistor';
export { solveNoise, fourKTJ, type NoiseResponse, type NoiseSource, type NoiseSourceKind, type NoiseOptions } from './solve-noise';
export { bandNoise, rmsFromDensity, BAND_NOISE_POINTS_PER_DECADE, type BandNoise } from './noise-integral';
export {
  analyzeStability,
  stabilityWarnings,
  loopGainColumns,
  DEFAULT_MIN_PHASE_MARGIN_DEG,
  type OpAmpStability,
  type LoopGainColumns,
  type TheoryWarning,
  type LowPhaseMarginWarning,
} from './stability';
export { throughDesign, THROUGH_NODE } from './through';
export { withSourceResistance, SOURCE_EMF_NODE, SOURCE_RESISTOR_ID } from './source-resistance';
