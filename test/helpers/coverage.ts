/**
 * Two-sided checks of a confidence interval's coverage. A nominal-p interval
 * applied to m independent trials covers the truth a Binomial(m, p) number of
 * times, so the observed fraction has the standard error √(p(1 − p)/m)
 * (binomial variance; any statistics text). An interval far too narrow covers
 * too seldom, one far too wide too often: both must fail.
 *
 * The band is p ± 4 standard errors. Why 4: a correct interval falls outside
 * it with probability about 6e-5 (two-sided normal tail at 4σ; the normal
 * approximation holds for m(1 − p) ≥ 15), so with the handful of such checks
 * in the suite a change of seed practically never flips a result, while the
 * band is still narrow: at m = 1000 and p = 0.95 it is ±2.8 %, which a 95 %
 * interval widened by a quarter (98.6 %) or narrowed by a fifth (88 %)
 * leaves. Common practice, no source for the choice of 4.
 */
import { expect } from 'vitest';

export const COVERAGE_STANDARD_ERRORS = 4;

/**
 * The accepted coverage band for `trials` independent trials of a nominal-`nominal` interval. Refuses a
 * trial count too small for the band to be two-sided (its top at or above 100 %: a far too wide interval
 * would pass) or for the normal approximation.
 */
export function coverageBand(nominal: number, trials: number): [number, number] {
  const standardError = Math.sqrt((nominal * (1 - nominal)) / trials);
  const band: [number, number] = [nominal - COVERAGE_STANDARD_ERRORS * standardError, nominal + COVERAGE_STANDARD_ERRORS * standardError];
  if (!(band[1] < 1 && band[0] > 0) || trials * Math.min(nominal, 1 - nominal) < 15) {
    throw new Error(`${trials} trials are too few for a two-sided coverage check of a ${nominal * 100} % interval (band ${band.map((b) => b.toFixed(3)).join('…')})`);
  }
  return band;
}

/** Asserts that `covered` of `trials` lies in the band around `nominal`; returns the band for further checks. */
export function expectCoverage(covered: number, trials: number, nominal: number, what: string): [number, number] {
  const band = coverageBand(nominal, trials);
  const coverage = covered / trials;
  expect(coverage, `${what}: coverage ${coverage.toFixed(4)} outside ${band.map((b) => b.toFixed(4)).join('…')}`).toBeGreaterThanOrEqual(band[0]);
  expect(coverage, `${what}: coverage ${coverage.toFixed(4)} outside ${band.map((b) => b.toFixed(4)).join('…')}`).toBeLessThanOrEqual(band[1]);
  return band;
}

/**
 * An interval widened (factor > 1) or narrowed (< 1) about its estimate: linearly, or for a positive
 * quantity on a log scale (the end ratios to the estimate raised to the factor).
 */
export function scaledInterval(interval: readonly [number, number], estimate: number, factor: number, scale: 'linear' | 'log' = 'linear'): [number, number] {
  const [low, high] = interval;
  if (scale === 'log') return [estimate * (low / estimate) ** factor, estimate * (high / estimate) ** factor];
  return [estimate - factor * (estimate - low), estimate + factor * (high - estimate)];
}

/** Whether `truth` lies in the closed interval. */
export function covers(interval: readonly [number, number], truth: number): boolean {
  return interval[0] <= truth && truth <= interval[1];
}
