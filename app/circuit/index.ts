/**
 * The circuit theory engine (pure): design model, AC and DC solvers, op-amp
 * and diode models, tolerance analysis, templates and SPICE export.
 */
export type { Design, Part, PartType, PassivePart, DiodePart, OpAmpPart, OpAmpModel, DiodeModel } from './types';
export { isGroundNode } from './types';
export { DesignError, SingularCircuitError, DcConvergenceError } from './design-error';
export { parseDesign, type ParseDesignOptions } from './parse-design';
export { withActualValues } from './actual-values';
export { solveAc, type AcResponse, type AcOptions, type OpAmpAcColumns } from './solve-ac';
export { summarizeAc, type AcSummary } from './summarize-ac';
export { maxUndistortedOutputVpk, stimulusLimitVpk } from './output-limits';
export { solveDcTransfer, type DcTransfer } from './solve-dc';
export { logStageIdeal } from './log-stage';
export { thermalVoltageV, BOLTZMANN_J_PER_K, ELEMENTARY_CHARGE_C } from './thermal-voltage';
export { monteCarloAc, TOLERANCE_BAND_SETTINGS, type MonteCarloOptions, type MonteCarloBand, type ToleranceDistribution } from './monte-carlo';
export { SeededRandom } from './random';
export { slowestTimeConstantS, circuitPoles, type Poles } from './time-constant';
export { TEMPLATES, makeDesignFromTemplate, type DesignFile } from './templates';
export { toSpiceNetlist, spiceNames, type SpiceAnalysis, type SpiceOptions, type SpiceNames } from './spice-netlist';
export { openLoopGainAt } from './opamp-gain';
export { outputOpAmpIndex } from './output-opamp';
