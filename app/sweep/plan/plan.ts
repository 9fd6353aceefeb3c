/**
 * Sweep planning: the grid, the amplitude, settling and integration of every
 * step, and the estimated duration. Bad requests are refused here, before any
 * instrument is touched.
 */
import { ValidationError } from '../../errors';
import type { PlannedStep, SweepPlanSummary, SweepRequest } from '../../contract/contract';
import { formatEngineering, linearGrid, logGrid } from '../../units';
import { autoAmplitudeVpp, fixedAmplitudeDistorts, type AmplitudeLimits } from './amplitude';
import { integrationTimeS, settleTimeS } from './settle';
import type { PlanColumns, PlanInstruments, PlanOptions, PlanTheory, SweepPlan } from './types';

const DEFAULT_MARGIN = 0.8;

export interface PlanInput {
  request: SweepRequest;
  /** The user's ceiling on generator output (Vpp); never exceeded. */
  maxStimulusVpp: number;
  instruments: PlanInstruments;
  theory: PlanTheory;
  options?: PlanOptions;
}

export function planSweep(input: PlanInput): SweepPlan {
  validateRequest(input);
  const { request } = input;
  const stimuli = request.kind === 'ac' ? frequencyGrid(request) : dcLevels(request);
  return planStepsAt(stimuli, input);
}

/** Steps at given stimuli with the same rules as the main plan (used for refinement points too). */
export function planStepsAt(stimuli: Float64Array, input: PlanInput): SweepPlan {
  const { request, instruments, theory, maxStimulusVpp } = input;
  const settleFraction = input.options?.settleFraction;
  const margin = input.options?.amplitudeMargin ?? DEFAULT_MARGIN;
  const count = stimuli.length;
  const columns: PlanColumns = {
    stimulus: Float64Array.from(stimuli),
    amplitudeVpp: new Float64Array(count),
    settleS: new Float64Array(count),
    integrateS: new Float64Array(count),
  };
  const warnings: string[] = [];
  const settleS = settleTimeS(theory.slowestTimeConstantS, instruments.instrumentSettleS, settleFraction);
  const limits: AmplitudeLimits = {
    maxStimulusVpp,
    generatorMaxVpp: instruments.generator.maxAmplitudeVpp,
    generatorMinVpp: instruments.generator.minAmplitudeVpp ?? 0,
    measurementMaxVpk: instruments.measurementMaxVpk,
    margin,
  };
  const distortedHz: number[] = [];
  for (let i = 0; i < count; i++) {
    columns.settleS[i] = settleS;
    if (request.kind === 'dc') {
      columns.amplitudeVpp[i] = 2 * Math.abs(stimuli[i]);
      columns.integrateS[i] = Math.max(instruments.minIntegrationS, 0);
      continue;
    }
    const frequencyHz = stimuli[i];
    columns.integrateS[i] = integrationTimeS(frequencyHz, request.minCycles, instruments.minIntegrationS);
    if (request.amplitude.mode === 'fixed') {
      columns.amplitudeVpp[i] = request.amplitude.vpp;
      if (fixedAmplitudeDistorts(frequencyHz, request.amplitude.vpp, theory)) distortedHz.push(frequencyHz);
    } else {
      const choice = autoAmplitudeVpp(frequencyHz, theory, limits, request.amplitude.targetOutputVpp);
      columns.amplitudeVpp[i] = choice.amplitudeVpp;
      if (choice.problem) warnings.push(`At ${formatEngineering(frequencyHz, 'Hz')}: ${choice.problem}; the output may distort there.`);
    }
  }
  if (distortedHz.length > 0) {
    warnings.push(
      `${request.amplitude.mode === 'fixed' ? request.amplitude.vpp + ' Vpp' : 'The amplitude'} drives the output past the rails or the slew-rate limit ` +
        `at ${distortedHz.length} of ${count} frequencies (${formatEngineering(distortedHz[0], 'Hz')} to ${formatEngineering(distortedHz[distortedHz.length - 1], 'Hz')}). ` +
        'Lower the amplitude or use automatic amplitude.',
    );
  }
  return { kind: request.kind, columns, averages: request.averages, physicalMinimumS: physicalMinimumS(columns, request.averages), warnings };
}

/** Σ (settle + averages · integrate) in seconds. */
export function physicalMinimumS(columns: PlanColumns, averages: number): number {
  let total = 0;
  for (let i = 0; i < columns.stimulus.length; i++) total += columns.settleS[i] + averages * columns.integrateS[i];
  return total;
}

/** The contract's summary for the window: objects at the edge, columns inside. */
export function toPlanSummary(plan: SweepPlan): SweepPlanSummary {
  const steps: PlannedStep[] = Array.from(plan.columns.stimulus, (stimulus, index) => ({
    index,
    stimulus,
    amplitudeVpp: plan.columns.amplitudeVpp[index],
    settleS: plan.columns.settleS[index],
    integrateS: plan.columns.integrateS[index],
  }));
  return { steps, estimatedDurationS: plan.physicalMinimumS, warnings: [...plan.warnings] };
}

function frequencyGrid(request: SweepRequest): Float64Array {
  return request.spacing === 'linear' ? linearGrid(request.from, request.to, linearPointCount(request, request.from, request.to)) : logGrid(request.from, request.to, request.pointsPerDecade);
}

/** The points of a linear sweep: as asked, or for a run stored before `points` existed, as many as its log grid had. */
function linearPointCount(request: SweepRequest, low: number, high: number): number {
  return request.points ?? Math.max(2, logGrid(low, high, request.pointsPerDecade).length);
}

/** DC transfer levels: log-spaced in magnitude, keeping the sign of the limits (the log stage needs one polarity). */
function dcLevels(request: SweepRequest): Float64Array {
  const sign = Math.sign(request.from);
  const low = Math.min(Math.abs(request.from), Math.abs(request.to));
  const high = Math.max(Math.abs(request.from), Math.abs(request.to));
  const magnitudes = request.spacing === 'linear' ? linearGrid(low, high, linearPointCount(request, low, high)) : logGrid(low, high, request.pointsPerDecade);
  return magnitudes.map((m) => sign * m);
}

function validateRequest(input: PlanInput): void {
  const { request, maxStimulusVpp, instruments } = input;
  const gen = instruments.generator;
  if (!(Number.isFinite(maxStimulusVpp) && maxStimulusVpp > 0)) {
    throw new ValidationError('maximum stimulus', `${maxStimulusVpp} Vpp is not a positive amplitude`, 'Set it with --max-stimulus VPP or on the Bench view.');
  }
  for (const [where, value] of [['from', request.from], ['to', request.to]] as const) {
    if (!Number.isFinite(value) || value === 0) throw new ValidationError(where, `${value} is not a usable ${request.kind === 'ac' ? 'frequency' : 'level'}`);
  }
  if (!(Number.isInteger(request.pointsPerDecade) && request.pointsPerDecade >= 1)) {
    throw new ValidationError('points per decade', `${request.pointsPerDecade} is not a whole number ≥ 1`);
  }
  if (!(Number.isInteger(request.averages) && request.averages >= 1)) throw new ValidationError('averages', `${request.averages} is not a whole number ≥ 1`);
  if (request.kind === 'ac') {
    if (!(request.minCycles >= 1)) throw new ValidationError('minimum cycles', `${request.minCycles} is below 1`);
    if (!(request.from > 0 && request.to > request.from)) {
      throw new ValidationError('from/to', `the range ${request.from} Hz to ${request.to} Hz is not increasing and positive`, 'Give --from below --to, both above 0 Hz.');
    }
    const range = `The generator covers ${formatEngineering(gen.minFrequencyHz, 'Hz')} to ${formatEngineering(gen.maxFrequencyHz, 'Hz')}.`;
    if (request.from < gen.minFrequencyHz) throw new ValidationError('from', `${formatEngineering(request.from, 'Hz')} is below the generator's range`, range);
    if (request.to > gen.maxFrequencyHz) throw new ValidationError('to', `${formatEngineering(request.to, 'Hz')} is above the generator's range`, range);
    if (request.amplitude.mode === 'fixed') {
      const vpp = request.amplitude.vpp;
      if (!(Number.isFinite(vpp) && vpp > 0)) throw new ValidationError('amplitude', `${vpp} Vpp is not a positive amplitude`);
      if (vpp > maxStimulusVpp) {
        throw new ValidationError('amplitude', `${vpp} Vpp exceeds the maximum stimulus ${maxStimulusVpp} Vpp`, 'Lower the amplitude, or raise the maximum if the circuit can take it.');
      }
      if (vpp > gen.maxAmplitudeVpp) throw new ValidationError('amplitude', `${vpp} Vpp exceeds the generator's maximum ${gen.maxAmplitudeVpp} Vpp`);
    } else if (request.amplitude.targetOutputVpp !== undefined && !(request.amplitude.targetOutputVpp > 0)) {
      throw new ValidationError('target output', `${request.amplitude.targetOutputVpp} Vpp is not a positive amplitude`);
    }
  } else {
    if (Math.sign(request.from) !== Math.sign(request.to)) {
      throw new ValidationError('from/to', 'DC levels must not cross 0 V on a log scale', 'Sweep one polarity, e.g. --from 1m --to 10.');
    }
    const largestV = Math.max(Math.abs(request.from), Math.abs(request.to));
    // A DC level V counts as 2·|V| against the maximum stimulus and the generator's own maximum.
    if (2 * largestV > maxStimulusVpp) {
      throw new ValidationError('to', `a DC level of ${largestV} V counts as ${2 * largestV} Vpp, above the maximum stimulus ${maxStimulusVpp} Vpp`, 'Lower the largest level or raise the maximum stimulus.');
    }
    if (2 * largestV > gen.maxAmplitudeVpp) {
      throw new ValidationError('to', `a DC level of ${largestV} V counts as ${2 * largestV} Vpp, above the generator's maximum ${gen.maxAmplitudeVpp} Vpp`, 'Lower the largest level.');
    }
  }
}
