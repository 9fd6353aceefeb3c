/**
 * Cramér–Rao bounds for the amplitude and phase of a sinusoid of known
 * frequency in white Gaussian noise of variance σ².
 *
 * Asymptotic form (S. M. Kay, Fundamentals of Statistical Signal Processing:
 * Estimation Theory, 1993, Example 3.14 — there with unknown frequency; with the
 * frequency known the Fisher matrix for (A, φ) is diagonal with entries
 * N/(2σ²) and N·A²/(2σ²); recalled from memory):
 *   var(Â) ≥ 2σ²/N,   var(φ̂) ≥ 2σ²/(N·A²).
 *
 * The exact form for a given record builds the Fisher matrix (1/σ²)·HᵀH of the
 * model A·cos(ωt + φ) + c with H = ∂s/∂(A, φ, c) and inverts it; it tends to the
 * asymptotic form when the record spans many cycles.
 */
import { ValidationError } from '../errors';
import { FitError } from './errors';
import { invertMatrix } from './linear-algebra';

export interface SinusoidBound {
  amplitudeVarianceV2: number;
  phaseVarianceRad2: number;
}

export function cramerRaoSinusoid(amplitudeV: number, noiseStdV: number, sampleCount: number): SinusoidBound {
  if (!(amplitudeV > 0)) throw new ValidationError('amplitudeV', `${amplitudeV} must be positive`);
  if (!(noiseStdV >= 0)) throw new ValidationError('noiseStdV', `${noiseStdV} must be zero or positive`);
  if (!(Number.isInteger(sampleCount) && sampleCount > 0)) throw new ValidationError('sampleCount', `${sampleCount} is not a positive whole number`);
  const noiseVariance = noiseStdV * noiseStdV;
  return {
    amplitudeVarianceV2: (2 * noiseVariance) / sampleCount,
    phaseVarianceRad2: (2 * noiseVariance) / (sampleCount * amplitudeV * amplitudeV),
  };
}

export interface ExactBoundRequest {
  amplitudeV: number;
  phaseRad: number;
  frequencyHz: number;
  sampleIntervalS: number;
  sampleCount: number;
  noiseStdV: number;
  startTimeS?: number;
}

/** The bound for this exact record (finite cycles, unknown offset included). */
export function cramerRaoSinusoidExact(request: ExactBoundRequest): SinusoidBound {
  const { amplitudeV, phaseRad, frequencyHz, sampleIntervalS, sampleCount, noiseStdV } = request;
  cramerRaoSinusoid(amplitudeV, noiseStdV, sampleCount); // same argument checks
  const omega = 2 * Math.PI * frequencyHz;
  const start = request.startTimeS ?? 0;
  const fisher = new Float64Array(9);
  for (let i = 0; i < sampleCount; i++) {
    const angle = omega * (start + i * sampleIntervalS) + phaseRad;
    const h = [Math.cos(angle), -amplitudeV * Math.sin(angle), 1]; // ∂s/∂A, ∂s/∂φ, ∂s/∂c
    for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) fisher[r * 3 + c] += h[r] * h[c];
  }
  const inverse = invertMatrix(fisher, 3);
  if (!inverse) throw new FitError('Cramér–Rao bound', 'the record cannot separate amplitude, phase and offset');
  const noiseVariance = noiseStdV * noiseStdV;
  return { amplitudeVarianceV2: noiseVariance * inverse[0], phaseVarianceRad2: noiseVariance * inverse[4] };
}
