/**
 * Levenberg–Marquardt least squares for small models (a handful of parameters,
 * up to thousands of residuals). Marquardt's diagonal scaling (Marquardt 1963,
 * J. SIAM 11(2)) makes steps independent of parameter units; bounds are held
 * by projection; a parameter marked logScale is fitted as ln p, which keeps it
 * positive and makes its interval asymmetric, as it should be for a quantity
 * like a saturation current known to within decades.
 *
 * Covariance: s²·(JᵀJ)⁻¹ at the solution with s² = Σr²/(m − n) (Gauss–Newton
 * approximation), intervals with the Student-t coverage factor for m − n degrees
 * of freedom (GUM, JCGM 100:2008 §G.3–G.4).
 */
import { ValidationError } from '../errors';
import { FitError } from './errors';
import { invertMatrix, solveLinear } from './linear-algebra';
import { studentTQuantile } from './student-t';

export interface ParameterSpec {
  name: string;
  initial: number;
  lower?: number;
  upper?: number;
  /** Fit ln(p) instead of p; p must stay positive. */
  logScale?: boolean;
}

export interface LeastSquaresProblem {
  parameters: ParameterSpec[];
  /** Residuals (model − data, optionally divided by each datum's uncertainty). */
  residuals(params: Float64Array): Float64Array;
  /** ∂r_i/∂p_j, row-major m×n, in the caller's (not log) parameters. Central differences when absent. */
  jacobian?(params: Float64Array): Float64Array;
  maxIterations?: number;
  /** Stop when the relative drop in Σr² per step is below this. Default 1e-12. */
  costTolerance?: number;
  /** Stop when every step is below this relative to its parameter. Default 1e-10. */
  stepTolerance?: number;
  /** Two-sided confidence level of the intervals. Default 0.95. */
  confidenceLevel?: number;
  /**
   * The residuals are already divided by known standard uncertainties: the
   * covariance is (JᵀJ)⁻¹, enlarged by χ²/(m − n) when that exceeds 1 (the
   * scatter says the uncertainties or the model are too optimistic — the
   * Particle Data Group's scale-factor practice, recalled from memory).
   */
  residualsAreStandardized?: boolean;
}

export type ConvergenceReason = 'small-cost-change' | 'small-step' | 'small-gradient' | 'exact-fit' | 'max-iterations' | 'no-better-step';

export interface LeastSquaresResult {
  names: string[];
  params: Float64Array;
  /** Standard uncertainties (Infinity when a parameter is not determined by the data). */
  standardErrors: Float64Array;
  /** n×n row-major covariance in the caller's parameters (log parameters by first-order propagation). */
  covariance: Float64Array;
  confidenceIntervals: Array<[number, number]>;
  confidenceLevel: number;
  coverageFactor: number;
  degreesOfFreedom: number;
  /** Σr² at the solution. */
  sumOfSquares: number;
  /** √(Σr²/(m − n)). */
  residualStd: number;
  iterations: number;
  reason: ConvergenceReason;
  /** Parameters that ended on a bound (their intervals are not reliable). */
  atBound: string[];
}

const EPSILON = 2.220446049250313e-16;
/** Central-difference step, ≈ ε^(1/3): balances truncation and rounding error (Numerical Recipes §5.7). */
const DIFFERENCE_STEP = Math.cbrt(EPSILON);

interface Internal {
  toExternal(u: Float64Array): Float64Array;
  lower: Float64Array;
  upper: Float64Array;
  start: Float64Array;
  scale: Float64Array;
  logScale: boolean[];
}

function prepare(parameters: ParameterSpec[]): Internal {
  const n = parameters.length;
  const lower = new Float64Array(n).fill(Number.NEGATIVE_INFINITY);
  const upper = new Float64Array(n).fill(Number.POSITIVE_INFINITY);
  const start = new Float64Array(n);
  const scale = new Float64Array(n);
  const logScale = parameters.map((p) => p.logScale === true);
  parameters.forEach((p, j) => {
    const where = `parameters.${p.name}`;
    if (!Number.isFinite(p.initial)) throw new ValidationError(`${where}.initial`, `${p.initial} is not a finite number`);
    if (p.lower !== undefined && p.upper !== undefined && !(p.lower < p.upper)) {
      throw new ValidationError(where, `lower bound ${p.lower} is not below upper bound ${p.upper}`);
    }
    if (logScale[j]) {
      if (!(p.initial > 0)) throw new ValidationError(`${where}.initial`, `${p.initial} must be positive for a log-scale parameter`);
      start[j] = Math.log(p.initial);
      if (p.lower !== undefined && p.lower > 0) lower[j] = Math.log(p.lower);
      if (p.upper !== undefined) {
        if (!(p.upper > 0)) throw new ValidationError(`${where}.upper`, 'must be positive for a log-scale parameter');
        upper[j] = Math.log(p.upper);
      }
    } else {
      start[j] = p.initial;
      if (p.lower !== undefined) lower[j] = p.lower;
      if (p.upper !== undefined) upper[j] = p.upper;
    }
    start[j] = Math.min(upper[j], Math.max(lower[j], start[j]));
    scale[j] = Math.max(Math.abs(start[j]), logScale[j] ? 1 : 1e-3);
  });
  const toExternal = (u: Float64Array) => {
    const p = new Float64Array(n);
    for (let j = 0; j < n; j++) p[j] = logScale[j] ? Math.exp(u[j]) : u[j];
    return p;
  };
  return { toExternal, lower, upper, start, scale, logScale };
}

function sumSquares(r: Float64Array): number {
  let sum = 0;
  for (let i = 0; i < r.length; i++) sum += r[i] * r[i];
  return sum;
}

function allFinite(values: Float64Array): boolean {
  for (let i = 0; i < values.length; i++) if (!Number.isFinite(values[i])) return false;
  return true;
}

export function levenbergMarquardt(problem: LeastSquaresProblem): LeastSquaresResult {
  const n = problem.parameters.length;
  if (n === 0) throw new ValidationError('parameters', 'is empty');
  const internal = prepare(problem.parameters);
  const maxIterations = problem.maxIterations ?? 200;
  const costTolerance = problem.costTolerance ?? 1e-12;
  const stepTolerance = problem.stepTolerance ?? 1e-10;
  const confidenceLevel = problem.confidenceLevel ?? 0.95;

  const evaluate = (u: Float64Array) => problem.residuals(internal.toExternal(u));

  const jacobianAt = (u: Float64Array, r: Float64Array): Float64Array => {
    const m = r.length;
    const jac = new Float64Array(m * n);
    if (problem.jacobian) {
      const p = internal.toExternal(u);
      const external = problem.jacobian(p);
      if (external.length !== m * n) throw new ValidationError('jacobian', `returned ${external.length} values, expected ${m}×${n}`);
      for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) jac[i * n + j] = external[i * n + j] * (internal.logScale[j] ? p[j] : 1);
      return jac;
    }
    for (let j = 0; j < n; j++) {
      const h = DIFFERENCE_STEP * Math.max(Math.abs(u[j]), internal.scale[j]);
      const forward = Float64Array.from(u);
      const backward = Float64Array.from(u);
      const canGoUp = u[j] + h <= internal.upper[j];
      const canGoDown = u[j] - h >= internal.lower[j];
      if (canGoUp) forward[j] += h;
      if (canGoDown) backward[j] -= h;
      const rForward = canGoUp ? evaluate(forward) : r;
      const rBackward = canGoDown ? evaluate(backward) : r;
      const span = (canGoUp ? h : 0) + (canGoDown ? h : 0);
      for (let i = 0; i < m; i++) jac[i * n + j] = (rForward[i] - rBackward[i]) / span;
    }
    return jac;
  };

  let u = Float64Array.from(internal.start);
  let r = evaluate(u);
  const m = r.length;
  if (m < n) throw new FitError('fit', `${m} residuals cannot determine ${n} parameters`, 'Measure more points.');
  if (!allFinite(r)) throw new FitError('fit', 'the model cannot be evaluated at the starting values', 'Give starting values inside the model\'s valid range.');
  let cost = sumSquares(r);
  let lambda = 1e-3;
  let iterations = 0;
  let reason: ConvergenceReason = 'max-iterations';
  let jac = jacobianAt(u, r);

  while (iterations < maxIterations) {
    iterations++;
    if (cost === 0) {
      reason = 'exact-fit';
      break;
    }
    // Scaled normal equations: D⁻¹JᵀJD⁻¹ with D = √diag(JᵀJ).
    const normal = new Float64Array(n * n);
    const gradient = new Float64Array(n);
    for (let i = 0; i < m; i++) {
      for (let a = 0; a < n; a++) {
        const ja = jac[i * n + a];
        gradient[a] += ja * r[i];
        for (let b = a; b < n; b++) normal[a * n + b] += ja * jac[i * n + b];
      }
    }
    for (let a = 0; a < n; a++) for (let b = 0; b < a; b++) normal[a * n + b] = normal[b * n + a];
    const d = new Float64Array(n);
    for (let a = 0; a < n; a++) d[a] = Math.sqrt(normal[a * n + a]) || 1;
    let gradientNorm = 0;
    for (let a = 0; a < n; a++) gradientNorm = Math.max(gradientNorm, Math.abs(gradient[a]) / d[a]);
    if (gradientNorm <= 1e-15 * Math.max(Math.sqrt(cost), 1e-300)) {
      reason = 'small-gradient';
      break;
    }
    let accepted = false;
    let step = new Float64Array(n);
    let candidate = u;
    let candidateR = r;
    let candidateCost = cost;
    while (lambda < 1e16) {
      const system = new Float64Array(n * n);
      const rhs = new Float64Array(n);
      for (let a = 0; a < n; a++) {
        rhs[a] = -gradient[a] / d[a];
        for (let b = 0; b < n; b++) system[a * n + b] = normal[a * n + b] / (d[a] * d[b]);
        system[a * n + a] += lambda;
      }
      const z = solveLinear(system, rhs, n);
      if (z) {
        candidate = new Float64Array(n);
        for (let a = 0; a < n; a++) candidate[a] = Math.min(internal.upper[a], Math.max(internal.lower[a], u[a] + z[a] / d[a]));
        candidateR = evaluate(candidate);
        candidateCost = allFinite(candidateR) ? sumSquares(candidateR) : Number.POSITIVE_INFINITY;
        if (candidateCost < cost) {
          for (let a = 0; a < n; a++) step[a] = candidate[a] - u[a];
          accepted = true;
          lambda = Math.max(lambda / 10, 1e-12);
          break;
        }
      }
      lambda *= 10;
    }
    if (!accepted) {
      reason = 'no-better-step';
      break;
    }
    const relativeDrop = (cost - candidateCost) / cost;
    u = candidate;
    r = candidateR;
    cost = candidateCost;
    jac = jacobianAt(u, r);
    let largestRelativeStep = 0;
    for (let a = 0; a < n; a++) largestRelativeStep = Math.max(largestRelativeStep, Math.abs(step[a]) / (Math.abs(u[a]) + internal.scale[a] * 1e-6 + stepTolerance));
    if (relativeDrop < costTolerance) {
      reason = 'small-cost-change';
      break;
    }
    if (largestRelativeStep < stepTolerance) {
      reason = 'small-step';
      break;
    }
  }

  return summarize(problem, internal, u, r, jac, cost, iterations, reason, confidenceLevel);
}

function summarize(
  problem: LeastSquaresProblem,
  internal: Internal,
  u: Float64Array,
  r: Float64Array,
  jac: Float64Array,
  cost: number,
  iterations: number,
  reason: ConvergenceReason,
  confidenceLevel: number,
): LeastSquaresResult {
  const n = u.length;
  const m = r.length;
  const params = internal.toExternal(u);
  const degreesOfFreedom = m - n;
  const standardized = problem.residualsAreStandardized === true;
  const residualVariance = degreesOfFreedom > 0 ? cost / degreesOfFreedom : Number.NaN;
  const varianceScale = standardized ? (degreesOfFreedom > 0 ? Math.max(1, residualVariance) : 1) : residualVariance;
  const coverageFactor = standardized
    ? studentTQuantile(0.5 + confidenceLevel / 2, 1e9)
    : degreesOfFreedom > 0
      ? studentTQuantile(0.5 + confidenceLevel / 2, degreesOfFreedom)
      : Number.NaN;

  const normal = new Float64Array(n * n);
  for (let i = 0; i < m; i++) for (let a = 0; a < n; a++) for (let b = 0; b < n; b++) normal[a * n + b] += jac[i * n + a] * jac[i * n + b];
  const d = new Float64Array(n);
  for (let a = 0; a < n; a++) d[a] = Math.sqrt(normal[a * n + a]);
  const scaled = new Float64Array(n * n);
  for (let a = 0; a < n; a++) for (let b = 0; b < n; b++) scaled[a * n + b] = d[a] > 0 && d[b] > 0 ? normal[a * n + b] / (d[a] * d[b]) : a === b ? 1 : 0;
  const scaledInverse = d.every((x) => x > 0) ? invertMatrix(scaled, n) : undefined;

  const internalCovariance = new Float64Array(n * n);
  if (scaledInverse) {
    for (let a = 0; a < n; a++) for (let b = 0; b < n; b++) internalCovariance[a * n + b] = (varianceScale * scaledInverse[a * n + b]) / (d[a] * d[b]);
  } else {
    internalCovariance.fill(Number.POSITIVE_INFINITY);
  }
  const gain = new Float64Array(n);
  for (let j = 0; j < n; j++) gain[j] = internal.logScale[j] ? params[j] : 1;
  const covariance = new Float64Array(n * n);
  for (let a = 0; a < n; a++) for (let b = 0; b < n; b++) covariance[a * n + b] = gain[a] * internalCovariance[a * n + b] * gain[b];

  const standardErrors = new Float64Array(n);
  const confidenceIntervals: Array<[number, number]> = [];
  for (let j = 0; j < n; j++) {
    const internalStd = Math.sqrt(internalCovariance[j * n + j]);
    standardErrors[j] = Math.sqrt(covariance[j * n + j]);
    const halfWidth = coverageFactor * internalStd;
    confidenceIntervals.push(
      internal.logScale[j] ? [Math.exp(u[j] - halfWidth), Math.exp(u[j] + halfWidth)] : [u[j] - halfWidth, u[j] + halfWidth],
    );
  }
  const atBound = problem.parameters.filter((_, j) => u[j] === internal.lower[j] || u[j] === internal.upper[j]).map((p) => p.name);
  return {
    names: problem.parameters.map((p) => p.name),
    params,
    standardErrors,
    covariance,
    confidenceIntervals,
    confidenceLevel,
    coverageFactor,
    degreesOfFreedom,
    sumOfSquares: cost,
    residualStd: Math.sqrt(residualVariance),
    iterations,
    reason,
    atBound,
  };
}
