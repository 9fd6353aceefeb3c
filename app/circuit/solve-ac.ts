/**
 * AC response of a design by modified nodal analysis with complex arithmetic,
 * plus per-op-amp noise gain, loop gain, open-loop gain and gain-limit point.
 */
import { dbFromRatio } from '../units';
import { AcSolver } from './ac-solver';
import { bisectLogF } from './bisect-log-f';
import { openLoopGainAt } from './opamp-gain';
import { continuousPhaseDeg } from './phase';
import type { Design, OpAmpModel } from './types';

export interface OpAmpAcColumns {
  id: string;
  /** |1/β| in dB. */
  noiseGainDb: Float64Array;
  /** |A·β| in dB. */
  loopGainDb: Float64Array;
  /** |A| in dB. */
  openLoopGainDb: Float64Array;
  /** Where |noise gain| meets |A| (loop gain 0 dB); undefined if it never does or the op-amp is ideal. */
  gainLimitHz: number | undefined;
}

export interface AcResponse {
  frequencyHz: Float64Array;
  gainDb: Float64Array;
  /** Continuous (unwrapped) phase, first point in (−180°, 180°]. */
  phaseDeg: Float64Array;
  re: Float64Array;
  im: Float64Array;
  idealGainDb: Float64Array;
  idealPhaseDeg: Float64Array;
  opamps: OpAmpAcColumns[];
}

export interface AcOptions {
  /** Treat every op-amp as ideal in the main response too. */
  idealOpAmps?: boolean;
}

export function solveAc(design: Design, frequenciesHz: Float64Array, options: AcOptions = {}): AcResponse {
  const count = frequenciesHz.length;
  const solver = new AcSolver(design);
  const h = new Float64Array(2);

  const sweep = (mode: 'model' | 'ideal') => {
    solver.stamp(mode);
    const re = new Float64Array(count);
    const im = new Float64Array(count);
    const gainDb = new Float64Array(count);
    for (let i = 0; i < count; i++) {
      solver.transferAt(frequenciesHz[i], h);
      re[i] = h[0];
      im[i] = h[1];
      gainDb[i] = dbFromRatio(Math.hypot(h[0], h[1]));
    }
    return { re, im, gainDb, phaseDeg: continuousPhaseDeg(re, im, new Float64Array(count)) };
  };

  const ideal = sweep('ideal');
  const main = options.idealOpAmps ? ideal : sweep('model');

  const opamps = solver.layout.opamps.map((slot, index) => opAmpColumns(solver, index, slot.id, slot.model, frequenciesHz));
  return {
    frequencyHz: Float64Array.from(frequenciesHz),
    gainDb: main.gainDb,
    phaseDeg: main.phaseDeg,
    re: main.re,
    im: main.im,
    idealGainDb: ideal.gainDb,
    idealPhaseDeg: ideal.phaseDeg,
    opamps,
  };
}

/**
 * H at one frequency per call, from the same model response as solveAc: one solver, stamped once, for
 * callers that ask frequency by frequency (a plan's amplitude choice, a scope's vertical scale, the
 * simulated bench's steady state) and need neither the ideal response nor the op-amp columns solveAc
 * computes beside it.
 */
export function transferFunction(design: Design): (frequencyHz: number) => { re: number; im: number } {
  const solver = new AcSolver(design);
  solver.stamp('model');
  const h = new Float64Array(2);
  return (frequencyHz) => {
    solver.transferAt(frequencyHz, h);
    return { re: h[0], im: h[1] };
  };
}

/** |H| as a ratio at one frequency per call (see transferFunction). */
export function gainRatioFunction(design: Design): (frequencyHz: number) => number {
  const transferAt = transferFunction(design);
  return (frequencyHz) => {
    const { re, im } = transferAt(frequencyHz);
    return Math.hypot(re, im);
  };
}

function opAmpColumns(solver: AcSolver, index: number, id: string, model: OpAmpModel, frequenciesHz: Float64Array): OpAmpAcColumns {
  const count = frequenciesHz.length;
  const noiseGainDb = new Float64Array(count);
  const loopGainDb = new Float64Array(count);
  const openLoopGainDb = new Float64Array(count);
  const beta = new Float64Array(2);
  const a = new Float64Array(2);
  solver.stamp('model');
  const ideal = model.ideal === true;
  for (let i = 0; i < count; i++) {
    solver.feedbackFractionAt(index, frequenciesHz[i], beta);
    const betaMagnitude = Math.hypot(beta[0], beta[1]);
    noiseGainDb[i] = -dbFromRatio(betaMagnitude);
    if (ideal) {
      openLoopGainDb[i] = Infinity;
      loopGainDb[i] = Infinity;
    } else {
      openLoopGainAt(model, frequenciesHz[i], a);
      openLoopGainDb[i] = dbFromRatio(Math.hypot(a[0], a[1]));
      loopGainDb[i] = openLoopGainDb[i] + dbFromRatio(betaMagnitude);
    }
  }
  return { id, noiseGainDb, loopGainDb, openLoopGainDb, gainLimitHz: ideal ? undefined : findGainLimitHz(solver, index, model) };
}

/** Loop-gain magnitude |A·β| at one frequency; the solver must hold the 'model' stamps. */
function loopGainMagnitude(solver: AcSolver, index: number, model: OpAmpModel, frequencyHz: number, beta: Float64Array, a: Float64Array): number {
  solver.feedbackFractionAt(index, frequencyHz, beta);
  openLoopGainAt(model, frequencyHz, a);
  return Math.hypot(a[0], a[1]) * Math.hypot(beta[0], beta[1]);
}

const SCAN_FROM_HZ = 1e-3;
const SCAN_POINTS_PER_DECADE = 10;
const BISECTION_STEPS = 60;

/**
 * First frequency where the loop gain falls through 1, independent of any
 * sweep grid: a coarse log scan from 1 mHz to 1000·GBW brackets the crossing,
 * then bisection on log f pins it down.
 */
function findGainLimitHz(solver: AcSolver, index: number, model: OpAmpModel): number | undefined {
  const beta = new Float64Array(2);
  const a = new Float64Array(2);
  const scanToHz = model.gbw * 1e3;
  const steps = Math.ceil(Math.log10(scanToHz / SCAN_FROM_HZ) * SCAN_POINTS_PER_DECADE);
  let previousHz = SCAN_FROM_HZ;
  let previousAbove = loopGainMagnitude(solver, index, model, previousHz, beta, a) > 1;
  for (let i = 1; i <= steps; i++) {
    const frequencyHz = SCAN_FROM_HZ * (scanToHz / SCAN_FROM_HZ) ** (i / steps);
    const above = loopGainMagnitude(solver, index, model, frequencyHz, beta, a) > 1;
    if (previousAbove && !above) {
      return bisectLogF(previousHz, frequencyHz, BISECTION_STEPS, (middleHz) => loopGainMagnitude(solver, index, model, middleHz, beta, a) > 1);
    }
    previousHz = frequencyHz;
    previousAbove = above;
  }
  return undefined;
}
