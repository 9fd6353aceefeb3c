/**
 * Test signals from reproducible noise: the project's own seeded generator
 * (app/numeric SeededRandom: xoshiro128**, Gaussian by Marsaglia's polar
 * method), so tests, benchmarks and the Monte Carlo draw from one generator.
 */
import { SeededRandom } from '../../app/numeric';

export function seededUniform(seed: number): () => number {
  const random = new SeededRandom(seed);
  return () => random.nextUniform();
}

export function seededGaussian(seed: number): () => number {
  const random = new SeededRandom(seed);
  return () => random.nextGaussian();
}

/** A·cos(2πf·t + φ) + c plus white Gaussian noise of standard deviation σ. */
export function noisySine(
  options: { amplitudeV: number; phaseRad: number; offsetV: number; frequencyHz: number; sampleIntervalS: number; sampleCount: number; noiseStdV: number },
  gaussian: () => number,
): Float64Array {
  const samples = new Float64Array(options.sampleCount);
  const omega = 2 * Math.PI * options.frequencyHz;
  for (let i = 0; i < options.sampleCount; i++) {
    samples[i] = options.amplitudeV * Math.cos(omega * i * options.sampleIntervalS + options.phaseRad) + options.offsetV + options.noiseStdV * gaussian();
  }
  return samples;
}
