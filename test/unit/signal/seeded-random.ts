/**
 * Reproducible noise for tests and benchmarks: mulberry32 uniform generator
 * (common practice, no source) and the Box–Muller transform for Gaussian
 * samples (Box & Muller 1958, Ann. Math. Stat. 29(2)).
 */
export function seededUniform(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export function seededGaussian(seed: number): () => number {
  const uniform = seededUniform(seed);
  let spare: number | undefined;
  return () => {
    if (spare !== undefined) {
      const value = spare;
      spare = undefined;
      return value;
    }
    const u1 = 1 - uniform(); // (0, 1]: log is finite
    const u2 = uniform();
    const radius = Math.sqrt(-2 * Math.log(u1));
    spare = radius * Math.sin(2 * Math.PI * u2);
    return radius * Math.cos(2 * Math.PI * u2);
  };
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
