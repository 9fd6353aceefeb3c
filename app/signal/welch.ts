/**
 * Power spectral density by Welch's method: the record is cut into segments
 * of N samples overlapping by a fraction (50 % by default), each segment has
 * its mean removed, is windowed (periodic Hann by default) and transformed,
 * and the periodograms are averaged (P. D. Welch, "The use of fast Fourier
 * transform for the estimation of power spectra", IEEE Trans. Audio
 * Electroacoustics AU-15 (1967) 70–73).
 *
 * Scaling (G. Heinzel, A. Rüdiger, R. Schilling, "Spectrum and spectral
 * density estimation by the Discrete Fourier transform (DFT)", 2002, §9):
 * one-sided PSD_k = 2·|X_k|²/(fs·S2) with S1 = Σw, S2 = Σw², i.e. the power
 * spectrum 2|X_k|²/S1² divided by the window's equivalent noise bandwidth
 * ENBW = fs·S2/S1². DC and Nyquist bins are not doubled.
 *
 * Uncertainty: an averaged periodogram is distributed as S·χ²_ν/ν with the
 * equivalent degrees of freedom
 *   ν = 2K / (1 + 2·Σ_{m=1}^{K−1} (1 − m/K)·ρ(m)),
 *   ρ(m) = (Σ_n w_n·w_{n+m·D})² / (Σ_n w_n²)²
 * for K segments D samples apart (D. B. Percival, A. T. Walden, "Spectral
 * Analysis for Physical Applications", Cambridge 1993, eq. (292b), recalled
 * from memory; for Hann at 50 % overlap Σw_n·w_{n+N/2}/Σw² = 1/6, so
 * ρ(1) = 1/36). So the PSD's relative
 * standard error is √(2/ν) and the density's (√PSD, delta method) 1/√(2ν).
 * The 95 % interval uses Wilson–Hilferty's cube-root approximation of the χ²
 * quantiles (E. B. Wilson, M. M. Hilferty, PNAS 17 (1931) 684–688), good to
 * well under 1 % of the interval for ν ≥ 10. These figures hold for
 * 0 < f < fs/2; the DC and Nyquist bins have half the degrees of freedom.
 *
 * The transform is fft.js (radix-4, real input); N must be a power of two.
 */
import FFT from 'fft.js';
import { ValidationError } from '../errors';
import { finiteColumn } from './finite-column';

export type WelchWindow = 'hann' | 'rectangular';

export interface WelchOptions {
  /** Samples per segment N, a power of two ≥ 16; sets the resolution fs/N. */
  segmentLength: number;
  /** Overlap as a fraction of N, in [0, 1); default 0.5. */
  overlap?: number;
  /** Default 'hann'. */
  window?: WelchWindow;
}

export interface WelchEstimate {
  /** k·fs/N for k = 0 … N/2. */
  frequencyHz: Float64Array;
  /** One-sided power spectral density, V²/Hz. */
  psdV2PerHz: Float64Array;
  /** √PSD, V/√Hz. */
  densityVPerRtHz: Float64Array;
  /** Number of averaged segments K. */
  segments: number;
  /** Equivalent χ² degrees of freedom ν of each bin (0 < f < fs/2). */
  degreesOfFreedom: number;
  /** Relative standard error of the PSD, √(2/ν). */
  psdRelativeStdError: number;
  /** Relative standard error of the density, 1/√(2ν). */
  densityRelativeStdError: number;
  /** 95 % interval of the true PSD as factors of the estimate: [ν/χ²(0.975), ν/χ²(0.025)]. */
  psdInterval95: [number, number];
  /** Equivalent noise bandwidth of one bin, fs·S2/S1², Hz. */
  enbwHz: number;
  /** Bin spacing fs/N, Hz. */
  resolutionHz: number;
}

/** Two-sided 97.5 % point of the standard normal distribution. */
const Z_975 = 1.959963984540054;

export function welchPsd(samplesV: ArrayLike<number>, sampleRateHz: number, options: WelchOptions): WelchEstimate {
  const samples = finiteColumn(samplesV, 'noise record');
  const n = options.segmentLength;
  if (!(Number.isInteger(n) && n >= 16 && (n & (n - 1)) === 0)) {
    throw new ValidationError('Welch segment length', `${n} is not a power of two of at least 16`, 'Use 256, 1024, 4096 …: the resolution is the sample rate divided by it.');
  }
  if (!(sampleRateHz > 0) || !Number.isFinite(sampleRateHz)) throw new ValidationError('sample rate', `${sampleRateHz} Hz is not a sample rate`, 'Give the sample rate in Hz (above 0).');
  const overlap = options.overlap ?? 0.5;
  if (!(overlap >= 0 && overlap < 1)) throw new ValidationError('Welch overlap', `${overlap} is not a fraction in [0, 1)`, 'Use 0.5 for 50 % overlap.');
  if (samples.length < n) {
    throw new ValidationError('noise record', `${samples.length} samples are fewer than one segment of ${n}`, 'Record more samples or use a shorter segment.');
  }
  const step = Math.max(1, Math.round(n * (1 - overlap)));
  const segments = Math.floor((samples.length - n) / step) + 1;
  const weights = makeWindow(options.window ?? 'hann', n);
  let s2 = 0;
  for (let i = 0; i < n; i++) s2 += weights[i] * weights[i];

  const fft = new FFT(n);
  const segment = new Float64Array(n);
  const spectrum = new Float64Array(2 * n);
  const bins = n / 2 + 1;
  const psd = new Float64Array(bins);
  for (let k = 0; k < segments; k++) {
    const start = k * step;
    let mean = 0;
    for (let i = 0; i < n; i++) mean += samples[start + i];
    mean /= n;
    for (let i = 0; i < n; i++) segment[i] = (samples[start + i] - mean) * weights[i];
    fft.realTransform(spectrum, segment);
    for (let b = 0; b < bins; b++) psd[b] += spectrum[2 * b] * spectrum[2 * b] + spectrum[2 * b + 1] * spectrum[2 * b + 1];
  }
  for (let b = 0; b < bins; b++) {
    const oneSided = b === 0 || b === n / 2 ? 1 : 2;
    psd[b] = (oneSided * psd[b]) / (segments * sampleRateHz * s2);
  }
  return welchEstimateOf(psd, segments, equivalentDegreesOfFreedom(weights, segments, step), { sampleRateHz, segmentLength: n, window: options.window ?? 'hann' });
}

/** What fixes a Welch estimate's frequency axis and its bins' equivalent noise bandwidth. */
export interface WelchAxis {
  sampleRateHz: number;
  segmentLength: number;
  window: WelchWindow;
}

/**
 * The estimate around an averaged one-sided PSD (V²/Hz, bins k·fs/N for
 * k = 0 … N/2) of `segments` segments with ν degrees of freedom: the axis, the
 * density, the relative errors and the 95 % interval. welchPsd ends here, and
 * so does an estimate combined from stored ones (welch-records.ts).
 */
export function welchEstimateOf(psdV2PerHz: Float64Array, segments: number, nu: number, axis: WelchAxis): WelchEstimate {
  const { sampleRateHz, segmentLength: n } = axis;
  const bins = n / 2 + 1;
  if (psdV2PerHz.length !== bins) throw new ValidationError('Welch estimate', `has ${psdV2PerHz.length} bins where a segment of ${n} gives ${bins}`, 'Combine only estimates of one segment length.');
  const weights = makeWindow(axis.window, n);
  let s1 = 0;
  let s2 = 0;
  for (let i = 0; i < n; i++) {
    s1 += weights[i];
    s2 += weights[i] * weights[i];
  }
  const frequencyHz = new Float64Array(bins);
  for (let b = 0; b < bins; b++) frequencyHz[b] = (b * sampleRateHz) / n;
  return {
    frequencyHz,
    psdV2PerHz,
    densityVPerRtHz: psdV2PerHz.map(Math.sqrt),
    segments,
    degreesOfFreedom: nu,
    psdRelativeStdError: Math.sqrt(2 / nu),
    densityRelativeStdError: 1 / Math.sqrt(2 * nu),
    psdInterval95: chiSquaredInterval95(nu),
    enbwHz: (sampleRateHz * s2) / (s1 * s1),
    resolutionHz: sampleRateHz / n,
  };
}

/** 95 % interval of a true PSD as factors of an estimate with ν degrees of freedom: [ν/χ²(0.975), ν/χ²(0.025)]. */
export function chiSquaredInterval95(nu: number): [number, number] {
  return [nu / chiSquaredQuantile(0.975, nu), nu / chiSquaredQuantile(0.025, nu)];
}

/** Periodic (DFT-even) window weights of length n, as recommended for spectral estimation (Heinzel et al. 2002, §C). */
function makeWindow(kind: WelchWindow, n: number): Float64Array {
  const weights = new Float64Array(n);
  for (let i = 0; i < n; i++) weights[i] = kind === 'hann' ? 0.5 * (1 - Math.cos((2 * Math.PI * i) / n)) : 1;
  return weights;
}

/** Percival & Walden eq. (292b): ν for K segments of window weights w, `step` samples apart. */
function equivalentDegreesOfFreedom(weights: Float64Array, segments: number, step: number): number {
  const n = weights.length;
  let s2 = 0;
  for (let i = 0; i < n; i++) s2 += weights[i] * weights[i];
  let correlationSum = 0;
  for (let m = 1; m < segments; m++) {
    const shift = m * step;
    if (shift >= n) break;
    let overlapSum = 0;
    for (let i = 0; i + shift < n; i++) overlapSum += weights[i] * weights[i + shift];
    correlationSum += (1 - m / segments) * (overlapSum / s2) ** 2;
  }
  return (2 * segments) / (1 + 2 * correlationSum);
}

/** Wilson–Hilferty approximation of the χ² quantile at probability 0.025 or 0.975. */
function chiSquaredQuantile(probability: 0.025 | 0.975, nu: number): number {
  const z = probability === 0.975 ? Z_975 : -Z_975;
  const c = 2 / (9 * nu);
  return nu * (1 - c + z * Math.sqrt(c)) ** 3;
}
