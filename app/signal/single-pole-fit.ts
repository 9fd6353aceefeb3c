/**
 * Estimates an op-amp's gain–bandwidth product from a measured stage response.
 * With ideal response H_ideal and noise gain NG (both complex, per frequency),
 * and a single-pole open-loop gain A(f) = A0/(1 + j·f·A0/GBW):
 *
 *   H = H_ideal / (1 + NG/A),   1/A = 1/A0 + j·f/GBW
 *
 * (the feedback relation in DEVELOPERS.md "Theory"). Residuals are taken on ln H:
 * ln|H| in nepers and ∠H in radians weigh gain and phase comparably; given
 * uncertainties turn them into standardized residuals.
 */
import { ValidationError } from '../errors';
import { radiansFromDegrees, wrapPhaseDeg, degreesFromRadians } from '../units';
import { FitError } from './errors';
import { finiteColumn } from './finite-column';
import { levenbergMarquardt, type ConvergenceReason } from './levenberg-marquardt';

export interface ComplexColumns {
  re: ArrayLike<number>;
  im: ArrayLike<number>;
}

export interface GainPhaseColumns {
  gainDb: ArrayLike<number>;
  phaseDeg: ArrayLike<number>;
  /** Standard uncertainties; when given, the fit weights each point by them. */
  gainUncertaintyDb?: ArrayLike<number>;
  phaseUncertaintyDeg?: ArrayLike<number>;
}

export interface SinglePoleFitRequest {
  frequenciesHz: ArrayLike<number>;
  measured: GainPhaseColumns | ComplexColumns;
  idealResponse: ComplexColumns;
  noiseGain: ComplexColumns;
  /** Also fit the DC open-loop gain A0 (only identifiable when the data show the low-frequency gain error). */
  fitOpenLoopGain?: boolean;
  initialGbwHz?: number;
}

export interface SinglePoleFit {
  gbwHz: number;
  gbwStdHz: number;
  gbwCi: [number, number];
  openLoopGain?: { value: number; std: number; ci: [number, number] };
  residualStd: number;
  iterations: number;
  reason: ConvergenceReason;
}

const NEPERS_PER_DB = Math.LN10 / 20;

function column(values: ArrayLike<number> | undefined, length: number, where: string): Float64Array {
  if (!values || typeof values.length !== 'number') throw new ValidationError(where, 'is missing');
  if (values.length !== length) throw new ValidationError(where, `has ${values.length} values, expected ${length}`);
  return finiteColumn(values, where);
}

export function fitSinglePoleOpAmp(request: SinglePoleFitRequest): SinglePoleFit {
  const frequencies = Float64Array.from(request.frequenciesHz ?? []);
  const count = frequencies.length;
  const fitA0 = request.fitOpenLoopGain === true;
  const parameterCount = fitA0 ? 2 : 1;
  if (count < parameterCount + 1) throw new ValidationError('frequenciesHz', `has ${count} points; at least ${parameterCount + 1} are needed`);
  frequencies.forEach((f, i) => {
    if (!(Number.isFinite(f) && f > 0)) throw new ValidationError(`frequenciesHz[${i}]`, `${f} is not a positive frequency`);
  });
  const idealRe = column(request.idealResponse?.re, count, 'idealResponse.re');
  const idealIm = column(request.idealResponse?.im, count, 'idealResponse.im');
  const ngRe = column(request.noiseGain?.re, count, 'noiseGain.re');
  const ngIm = column(request.noiseGain?.im, count, 'noiseGain.im');

  // Measured ln H as (nepers, radians) with per-point weights.
  const measuredLogMag = new Float64Array(count);
  const measuredPhaseDeg = new Float64Array(count);
  const magWeight = new Float64Array(count).fill(1);
  const phaseWeight = new Float64Array(count).fill(1);
  const measured = request.measured;
  if ('gainDb' in measured) {
    const gainDb = column(measured.gainDb, count, 'measured.gainDb');
    const phaseDeg = column(measured.phaseDeg, count, 'measured.phaseDeg');
    for (let i = 0; i < count; i++) {
      measuredLogMag[i] = gainDb[i] * NEPERS_PER_DB;
      measuredPhaseDeg[i] = phaseDeg[i];
    }
    if (measured.gainUncertaintyDb) {
      const u = column(measured.gainUncertaintyDb, count, 'measured.gainUncertaintyDb');
      u.forEach((x, i) => { if (!(x > 0)) throw new ValidationError(`measured.gainUncertaintyDb[${i}]`, `${x} must be positive`); magWeight[i] = 1 / (x * NEPERS_PER_DB); });
    }
    if (measured.phaseUncertaintyDeg) {
      const u = column(measured.phaseUncertaintyDeg, count, 'measured.phaseUncertaintyDeg');
      u.forEach((x, i) => { if (!(x > 0)) throw new ValidationError(`measured.phaseUncertaintyDeg[${i}]`, `${x} must be positive`); phaseWeight[i] = 1 / radiansFromDegrees(x); });
    }
  } else {
    const re = column(measured.re, count, 'measured.re');
    const im = column(measured.im, count, 'measured.im');
    for (let i = 0; i < count; i++) {
      const magnitude = Math.hypot(re[i], im[i]);
      if (!(magnitude > 0)) throw new ValidationError(`measured[${i}]`, 'is zero; its phase is undefined');
      measuredLogMag[i] = Math.log(magnitude);
      measuredPhaseDeg[i] = degreesFromRadians(Math.atan2(im[i], re[i]));
    }
  }
  const standardized = 'gainDb' in measured && measured.gainUncertaintyDb !== undefined && measured.phaseUncertaintyDeg !== undefined;

  // Starting GBW from each point's own loop-gain error: NG/A = H_ideal/H − 1, |A| ≈ f·GBW⁻¹ … so GBW ≈ f·|A|.
  const estimates: number[] = [];
  for (let i = 0; i < count; i++) {
    const mag = Math.exp(measuredLogMag[i]);
    const phase = radiansFromDegrees(measuredPhaseDeg[i]);
    const hRe = mag * Math.cos(phase), hIm = mag * Math.sin(phase);
    const denominator = hRe * hRe + hIm * hIm;
    const qRe = (idealRe[i] * hRe + idealIm[i] * hIm) / denominator - 1; // H_ideal/H − 1 = NG/A
    const qIm = (idealIm[i] * hRe - idealRe[i] * hIm) / denominator;
    const error = Math.hypot(qRe, qIm);
    if (error > 0.05) estimates.push((frequencies[i] * Math.hypot(ngRe[i], ngIm[i])) / error);
  }
  estimates.sort((a, b) => a - b);
  const gbw0 = request.initialGbwHz ?? (estimates.length > 0 ? estimates[Math.floor(estimates.length / 2)] : 1e6);
  if (!(gbw0 > 0 && Number.isFinite(gbw0))) throw new ValidationError('initialGbwHz', `${gbw0} is not a positive frequency`);

  const residuals = (p: Float64Array): Float64Array => {
    const gbw = p[0];
    const inverseA0 = fitA0 ? 1 / p[1] : 0;
    const out = new Float64Array(2 * count);
    for (let i = 0; i < count; i++) {
      const x = inverseA0, y = frequencies[i] / gbw; // 1/A = x + j·y
      const dRe = 1 + ngRe[i] * x - ngIm[i] * y;
      const dIm = ngIm[i] * x + ngRe[i] * y;
      const logMag = Math.log(Math.hypot(idealRe[i], idealIm[i])) - Math.log(Math.hypot(dRe, dIm));
      const phaseDeg = degreesFromRadians(Math.atan2(idealIm[i], idealRe[i]) - Math.atan2(dIm, dRe));
      out[2 * i] = (logMag - measuredLogMag[i]) * magWeight[i];
      out[2 * i + 1] = radiansFromDegrees(wrapPhaseDeg(phaseDeg - measuredPhaseDeg[i])) * phaseWeight[i];
    }
    return out;
  };
  const parameters = [{ name: 'gbwHz', initial: gbw0, lower: 1, upper: 1e13, logScale: true }];
  if (fitA0) parameters.push({ name: 'openLoopGain', initial: 1e5, lower: 1, upper: 1e10, logScale: true });
  const result = levenbergMarquardt({ parameters, residuals, residualsAreStandardized: standardized });
  if (!Number.isFinite(result.params[0])) throw new FitError('GBW fit', 'did not converge', 'Include points past the gain-limit frequency.');
  const fit: SinglePoleFit = {
    gbwHz: result.params[0],
    gbwStdHz: result.standardErrors[0],
    gbwCi: result.confidenceIntervals[0],
    residualStd: result.residualStd,
    iterations: result.iterations,
    reason: result.reason,
  };
  if (fitA0) fit.openLoopGain = { value: result.params[1], std: result.standardErrors[1], ci: result.confidenceIntervals[1] };
  return fit;
}
