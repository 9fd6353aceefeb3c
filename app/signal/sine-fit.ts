/**
 * Three-parameter least-squares sine fit at a known frequency, the fit of
 * IEEE Std 1057 (1994 edition §4.1.3.1; the clause number in the 2017 revision
 * is not verified here — recalled from memory). Model:
 *
 *   y[n] = a·cos(ωt[n]) + b·sin(ωt[n]) + c = A·cos(ωt[n] + φ) + c,
 *   A = √(a² + b²), φ = atan2(−b, a).
 *
 * The model is linear in (a, b, c), so the least-squares estimate is exact and
 * its covariance is s²·(DᵀD)⁻¹ with s² = Σr²/(N − 3); amplitude and phase
 * uncertainties follow by first-order propagation (GUM, JCGM 100:2008 §5.1.2).
 */
import { ValidationError } from '../errors';
import { dbFromRatio } from '../units';
import { FitError } from './errors';
import { invertMatrix } from './linear-algebra';

export interface SineRecord {
  samplesV: Float64Array;
  sampleIntervalS: number;
  /** Time of samplesV[0]; phases refer to t = 0. Default 0. */
  startTimeS?: number;
}

export interface SineFitRequest extends SineRecord {
  frequencyHz: number;
}

export interface SineFit {
  frequencyHz: number;
  /** Peak amplitude, volts. */
  amplitudeV: number;
  /** φ in A·cos(2πf·t + φ), radians in (−π, π]. */
  phaseRad: number;
  offsetV: number;
  /** √(Σr²/N) of the residual r = samples − fit. */
  residualRmsV: number;
  /** Standard uncertainties from the residual scatter (white-noise assumption). */
  amplitudeStdV: number;
  phaseStdRad: number;
  offsetStdV: number;
  /** Sine power over residual power, dB. */
  snrDb: number;
  sampleCount: number;
}

const MIN_SAMPLES = 4;

function validate(request: SineFitRequest): void {
  const { samplesV, sampleIntervalS, frequencyHz } = request;
  if (!(samplesV instanceof Float64Array)) throw new ValidationError('samplesV', 'must be a Float64Array');
  if (samplesV.length < MIN_SAMPLES) {
    throw new ValidationError('samplesV', `has ${samplesV.length} samples; a three-parameter fit needs at least ${MIN_SAMPLES}`, 'Capture a longer record.');
  }
  if (!(Number.isFinite(sampleIntervalS) && sampleIntervalS > 0)) throw new ValidationError('sampleIntervalS', `${sampleIntervalS} is not a positive time`);
  if (!(Number.isFinite(frequencyHz) && frequencyHz > 0)) throw new ValidationError('frequencyHz', `${frequencyHz} is not a positive frequency`);
  if (frequencyHz * sampleIntervalS >= 0.5) {
    throw new ValidationError(
      'frequencyHz',
      `${frequencyHz} Hz is at or above half the sample rate (${0.5 / sampleIntervalS} Hz)`,
      'Sample faster (shorter time base) so the sine has more than two samples per cycle.',
    );
  }
  const start = request.startTimeS ?? 0;
  if (!Number.isFinite(start)) throw new ValidationError('startTimeS', `${start} is not a finite time`);
  for (let i = 0; i < samplesV.length; i++) {
    if (!Number.isFinite(samplesV[i])) {
      throw new ValidationError(`samplesV[${i}]`, `${samplesV[i]} is not a finite reading`, 'The record holds an overrange or missing sample; reduce the amplitude or the vertical sensitivity.');
    }
  }
}

export function sineFit3(request: SineFitRequest): SineFit {
  validate(request);
  const { samplesV, sampleIntervalS, frequencyHz } = request;
  const startTimeS = request.startTimeS ?? 0;
  const n = samplesV.length;
  // Whole cycles before the record are dropped so a late start time does not cost cos/sin precision.
  const startCycles = frequencyHz * startTimeS;
  const startFraction = startCycles - Math.floor(startCycles);
  const cyclesPerSample = frequencyHz * sampleIntervalS;
  const cosColumn = new Float64Array(n);
  const sinColumn = new Float64Array(n);
  // Normal equations DᵀD·x = Dᵀy with D = [cos, sin, 1].
  let cc = 0, cs = 0, c1 = 0, ss = 0, s1 = 0, cy = 0, sy = 0, y1 = 0;
  for (let i = 0; i < n; i++) {
    const angle = 2 * Math.PI * (startFraction + i * cyclesPerSample);
    const c = Math.cos(angle);
    const s = Math.sin(angle);
    const y = samplesV[i];
    cosColumn[i] = c;
    sinColumn[i] = s;
    cc += c * c; cs += c * s; c1 += c; ss += s * s; s1 += s;
    cy += c * y; sy += s * y; y1 += y;
  }
  const normal = Float64Array.of(cc, cs, c1, cs, ss, s1, c1, s1, n);
  const inverse = invertMatrix(normal, 3);
  if (!inverse) {
    throw new FitError('sine fit', 'the sample times do not separate cosine, sine and offset at this frequency', 'Use a record that is not synchronous with half the sample rate.');
  }
  const rhs = [cy, sy, y1];
  const x = [0, 0, 0];
  for (let r = 0; r < 3; r++) x[r] = inverse[r * 3] * rhs[0] + inverse[r * 3 + 1] * rhs[1] + inverse[r * 3 + 2] * rhs[2];
  const [a, b, offsetV] = x;

  let residualSumSq = 0;
  for (let i = 0; i < n; i++) {
    const residual = samplesV[i] - (a * cosColumn[i] + b * sinColumn[i] + offsetV);
    residualSumSq += residual * residual;
  }
  const residualVariance = residualSumSq / (n - 3);
  const amplitudeV = Math.hypot(a, b);
  const phaseRad = Math.atan2(-b, a);

  // Covariance of (a, b) is s²·inverse[0..1][0..1]; J = ∂(A, φ)/∂(a, b).
  const vaa = residualVariance * inverse[0];
  const vab = residualVariance * inverse[1];
  const vbb = residualVariance * inverse[4];
  let amplitudeStdV = 0;
  let phaseStdRad = Number.POSITIVE_INFINITY;
  if (amplitudeV > 0) {
    const dAda = a / amplitudeV, dAdb = b / amplitudeV;
    const a2 = amplitudeV * amplitudeV;
    const dPda = b / a2, dPdb = -a / a2;
    amplitudeStdV = Math.sqrt(Math.max(0, dAda * dAda * vaa + 2 * dAda * dAdb * vab + dAdb * dAdb * vbb));
    phaseStdRad = Math.sqrt(Math.max(0, dPda * dPda * vaa + 2 * dPda * dPdb * vab + dPdb * dPdb * vbb));
  } else {
    amplitudeStdV = Math.sqrt(Math.max(0, (vaa + vbb) / 2));
  }
  const residualRmsV = Math.sqrt(residualSumSq / n);
  const snrDb = residualRmsV > 0 ? dbFromRatio(amplitudeV / Math.SQRT2 / residualRmsV) : Number.POSITIVE_INFINITY;
  return {
    frequencyHz,
    amplitudeV,
    phaseRad,
    offsetV,
    residualRmsV,
    amplitudeStdV,
    phaseStdRad,
    offsetStdV: Math.sqrt(Math.max(0, residualVariance * inverse[8])),
    snrDb,
    sampleCount: n,
  };
}
