/**
 * Fits the diode-feedback logarithmic stage
 *   V_out = −(n·V_T·ln(I/I_S + 1) + I·R_S),  I = V_in/R,  V_T = kT/q
 * (Shockley diode equation with series resistance) to a DC transfer sweep.
 * I_S spans decades between parts, so it is fitted as ln I_S. Intervals are
 * 95 % Student-t (see levenberg-marquardt.ts).
 */
import { ValidationError } from '../errors';
import { FitError } from './errors';
import { finiteColumn } from './finite-column';
import { levenbergMarquardt, type ConvergenceReason } from './levenberg-marquardt';
import { thermalVoltageV } from '../circuit/thermal-voltage'; // CODATA 2018 constants, defined once in app/circuit

export interface LogStageInitial {
  n?: number;
  isA?: number;
  rsOhm?: number;
}

export interface LogStageFit {
  n: number;
  nCi: [number, number];
  nStd: number;
  isA: number;
  isCi: [number, number];
  isStdA: number;
  rsOhm: number;
  rsCi: [number, number];
  rsStdOhm: number;
  thermalVoltageV: number;
  residualStdV: number;
  iterations: number;
  reason: ConvergenceReason;
  /** Parameters that ended on a bound (e.g. R_S = 0: no series resistance visible). */
  atBound: string[];
  /** True when the stage was driven with negative input and the fit mirrored both axes. */
  mirrored: boolean;
}

const MIN_POINTS = 4;

function toArray(values: ArrayLike<number>, where: string): Float64Array {
  if (values === null || typeof values !== 'object' || typeof values.length !== 'number') throw new ValidationError(where, 'must be an array of numbers');
  return finiteColumn(values, where);
}

/** Least-squares line through (x, y): returns [slope, intercept]. */
function fitLine(x: Float64Array, y: Float64Array): [number, number] {
  const n = x.length;
  let sx = 0, sy = 0, sxx = 0, sxy = 0;
  for (let i = 0; i < n; i++) { sx += x[i]; sy += y[i]; sxx += x[i] * x[i]; sxy += x[i] * y[i]; }
  const slope = (n * sxy - sx * sy) / (n * sxx - sx * sx);
  return [slope, (sy - slope * sx) / n];
}

export function fitLogStage(
  inputV: ArrayLike<number>,
  outputV: ArrayLike<number>,
  inputResistorOhm: number,
  temperatureC: number,
  initial: LogStageInitial = {},
): LogStageFit {
  let vin = toArray(inputV, 'inputV');
  let vout = toArray(outputV, 'outputV');
  if (vin.length !== vout.length) throw new ValidationError('outputV', `has ${vout.length} values but inputV has ${vin.length}`);
  if (vin.length < MIN_POINTS) throw new ValidationError('inputV', `has ${vin.length} points; the fit needs at least ${MIN_POINTS}`, 'Sweep more input levels.');
  if (!(Number.isFinite(inputResistorOhm) && inputResistorOhm > 0)) throw new ValidationError('inputResistorOhm', `${inputResistorOhm} is not a positive resistance`);
  if (!(Number.isFinite(temperatureC) && temperatureC > -100 && temperatureC < 200)) {
    throw new ValidationError('temperatureC', `${temperatureC} °C is outside −100…200 °C`, 'Give the board temperature in degrees Celsius.');
  }
  const allPositive = vin.every((v) => v > 0);
  const allNegative = vin.every((v) => v < 0);
  if (!allPositive && !allNegative) {
    throw new ValidationError('inputV', 'mixes positive, zero and negative levels', 'A log stage conducts in one direction: sweep input levels of one sign, excluding 0 V.');
  }
  if (allNegative) {
    vin = vin.map((v) => -v);
    vout = vout.map((v) => -v);
  }
  const vt = thermalVoltageV(temperatureC);
  const current = vin.map((v) => v / inputResistorOhm);

  // Start from a line through the lower half (R_S matters least there): V_out ≈ −n·V_T·ln I + n·V_T·ln I_S.
  const order = Array.from(current.keys()).sort((a, b) => current[a] - current[b]);
  const lowHalf = order.slice(0, Math.max(3, Math.ceil(order.length / 2)));
  const [slope, intercept] = fitLine(Float64Array.from(lowHalf, (i) => Math.log(current[i])), Float64Array.from(lowHalf, (i) => vout[i]));
  const nGuess = -slope / vt;
  const usable = Number.isFinite(nGuess) && nGuess > 0.3 && nGuess < 10;
  const n0 = initial.n ?? (usable ? nGuess : 1.5);
  const is0 = initial.isA ?? (usable ? Math.exp(intercept / (nGuess * vt)) : 1e-12);
  const rs0 = initial.rsOhm ?? 0;
  if (!(is0 > 0 && Number.isFinite(is0))) throw new FitError('log stage fit', 'no usable starting value for I_S', 'Pass initial.isA, e.g. 1e-12.');

  const m = vin.length;
  const model = (p: Float64Array, i: number) => -(p[0] * vt * Math.log1p(current[i] / p[1]) + current[i] * p[2]);
  const result = levenbergMarquardt({
    parameters: [
      { name: 'n', initial: n0, lower: 0.1, upper: 20 },
      { name: 'isA', initial: is0, lower: 1e-30, upper: 1, logScale: true },
      { name: 'rsOhm', initial: rs0, lower: 0 },
    ],
    residuals: (p) => Float64Array.from({ length: m }, (_, i) => model(p, i) - vout[i]),
    jacobian: (p) => {
      const jac = new Float64Array(m * 3);
      for (let i = 0; i < m; i++) {
        const ratio = current[i] / p[1];
        jac[i * 3] = -vt * Math.log1p(ratio);
        jac[i * 3 + 1] = (p[0] * vt * ratio) / (p[1] * (1 + ratio)); // ∂/∂I_S of −n·V_T·ln(I/I_S + 1)
        jac[i * 3 + 2] = -current[i];
      }
      return jac;
    },
  });
  const [n, isA, rsOhm] = result.params;
  return {
    n,
    nCi: result.confidenceIntervals[0],
    nStd: result.standardErrors[0],
    isA,
    isCi: result.confidenceIntervals[1],
    isStdA: result.standardErrors[1],
    rsOhm,
    rsCi: result.confidenceIntervals[2],
    rsStdOhm: result.standardErrors[2],
    thermalVoltageV: vt,
    residualStdV: result.residualStd,
    iterations: result.iterations,
    reason: result.reason,
    atBound: result.atBound,
    mirrored: allNegative,
  };
}

/** The shape stored in RunFigures.logFit. */
export function logFitFigures(fit: LogStageFit): { n: number; nCi: [number, number]; isA: number; isCi: [number, number]; rsOhm: number; rsCi: [number, number] } {
  return { n: fit.n, nCi: fit.nCi, isA: fit.isA, isCi: fit.isCi, rsOhm: fit.rsOhm, rsCi: fit.rsCi };
}
