/**
 * A Gaussian noise record whose one-sided spectral density follows a given
 * curve: white Gaussian coefficients in the frequency domain, each bin scaled
 * by √density, inverse-transformed (fft.js). The record is periodic in its
 * length N (a circular stationary Gaussian process), so any stretch of it has
 * the density asked for at the bins k·fs/N.
 *
 * Scaling: a real record x_n = (1/N)·Σ X_k e^{j2πkn/N} with Hermitian X has,
 * per bin 0 < k < N/2, the component (2/N)·(Re X_k cos − Im X_k sin), of
 * power (2/N)²·(σ_re² + σ_im²)/2. That power must be S(f_k)·fs/N (density
 * times bin width), so Re X_k and Im X_k each have σ = (N/2)·√(S·fs/N).
 * The DC and Nyquist bins are left at zero (no offset, no Nyquist tone).
 */
import FFT from 'fft.js';
import { ValidationError } from '../errors';

export interface ShapedNoiseOptions {
  /** Record length N, a power of two ≥ 16. */
  length: number;
  sampleRateHz: number;
  /** One-sided density at each frequency, V/√Hz (called once per bin with increasing frequencies). */
  densityVPerRtHz: (frequencyHz: number) => number;
  /** A standard normal deviate per call (seeded by the caller, so records repeat). */
  gaussian: () => number;
}

export function shapedNoiseRecord(options: ShapedNoiseOptions): Float64Array {
  const n = options.length;
  if (!(Number.isInteger(n) && n >= 16 && (n & (n - 1)) === 0)) {
    throw new ValidationError('noise record length', `${n} is not a power of two of at least 16`, 'Use 4096, 65536 …');
  }
  const fs = options.sampleRateHz;
  if (!(fs > 0) || !Number.isFinite(fs)) throw new ValidationError('sample rate', `${fs} Hz is not a sample rate`, 'Give the sample rate in Hz (above 0).');
  const fft = new FFT(n);
  const spectrum = fft.createComplexArray() as number[];
  const half = n / 2;
  for (let k = 1; k < half; k++) {
    const density = options.densityVPerRtHz((k * fs) / n);
    if (!(density >= 0) || !Number.isFinite(density)) {
      throw new ValidationError('noise density', `${density} V/√Hz at ${(k * fs) / n} Hz is not a density`, 'The density must be a finite number of volts per root hertz, 0 or more.');
    }
    const sigma = half * density * Math.sqrt(fs / n);
    const re = sigma * options.gaussian();
    const im = sigma * options.gaussian();
    spectrum[2 * k] = re;
    spectrum[2 * k + 1] = im;
    spectrum[2 * (n - k)] = re;
    spectrum[2 * (n - k) + 1] = -im;
  }
  const out = fft.createComplexArray() as number[];
  fft.inverseTransform(out, spectrum);
  const record = new Float64Array(n);
  for (let i = 0; i < n; i++) record[i] = out[2 * i];
  return record;
}
