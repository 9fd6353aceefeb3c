/**
 * Monte Carlo tolerance bands with a fixed seed, against the spread expected
 * from the part tolerances.
 *
 * Circuit: passive RC low-pass, H = 1/(1 + jωτ), τ = R·C. Its gain at a fixed
 * frequency falls monotonically with τ, so the p-th gain percentile belongs to
 * the (100 − p)-th percentile of τ, and each band edge converts back to a
 * corner frequency fc = 1/(2πτ).
 * Expected τ percentiles, derived analytically (not by simulation):
 * - uniform ±a on R and ±b on C: τ/τ0 = (1 + a·U1)(1 + b·U2), U uniform on
 *   [−1, 1]; its CDF F(x) = ½∫ clamp(((x/(1 + b·v) − 1)/a + 1)/2, 0, 1) dv
 *   over v ∈ [−1, 1], integrated by Simpson's rule and inverted by bisection.
 * - gaussian on R only (σ = t/3 truncated at ±t, as documented in
 *   monte-carlo.ts): quantile of the truncated normal via the normal CDF
 *   (erf by Abramowitz & Stegun 7.1.26, |error| < 1.5e-7).
 * With 20 000 samples the sample 2.5 % quantile has a standard error of about
 * 0.07 % of fc here, so the 0.3 % limits are > 4 standard errors.
 */
import { describe, expect, it } from 'vitest';
import { monteCarloAc, parseDesign, solveAc, type Design } from '../../../app/circuit';
import { normalCdf } from '../../helpers/normal-distribution';
import { covers, expectCoverage, scaledInterval } from '../../helpers/coverage';
import { seededUniform } from '../../helpers/test-signals';

const R0 = 10e3;
const C0 = 15.9e-9;
const NOMINAL_CORNER_HZ = 1 / (2 * Math.PI * R0 * C0);

function rcLowPass(resistorTolerance: number, capacitorTolerance: number | undefined): Design {
  const capacitor: Record<string, unknown> = { id: 'C1', type: 'capacitor', nodes: ['out', '0'], value: C0 };
  if (capacitorTolerance !== undefined) capacitor.tolerance = capacitorTolerance;
  return parseDesign(
    {
      name: 'RC low-pass (invented test circuit)',
      input: 'in',
      output: 'out',
      parts: [{ id: 'R1', type: 'resistor', nodes: ['in', 'out'], value: R0, tolerance: resistorTolerance }, capacitor],
    },
    'rc',
  );
}

/** Corner frequency implied by the gain of H = 1/(1 + jωτ) at frequencyHz. */
function cornerFromGainHz(gainDb: number, frequencyHz: number): number {
  const omegaTau = Math.sqrt(10 ** (-gainDb / 10) - 1);
  return frequencyHz / omegaTau;
}

function productOfUniformsCdf(x: number, a: number, b: number): number {
  const intervals = 20000;
  const h = 2 / intervals;
  const integrand = (v: number) => Math.min(1, Math.max(0, ((x / (1 + b * v) - 1) / a + 1) / 2));
  let sum = integrand(-1) + integrand(1);
  for (let i = 1; i < intervals; i++) sum += (i % 2 === 1 ? 4 : 2) * integrand(-1 + i * h);
  return ((sum * h) / 3) / 2;
}

function quantile(cdf: (x: number) => number, p: number, low: number, high: number): number {
  for (let k = 0; k < 80; k++) {
    const middle = (low + high) / 2;
    if (cdf(middle) < p) low = middle;
    else high = middle;
  }
  return (low + high) / 2;
}

describe('Monte Carlo tolerance band', () => {
  const probeHz = Float64Array.from([10 * NOMINAL_CORNER_HZ]);

  it('uniform ±5 % R and ±10 % C: the band edges give the analytically expected 2.5 % and 97.5 % corner frequencies', () => {
    const a = 0.05;
    const b = 0.1;
    const band = monteCarloAc(rcLowPass(a, b), probeHz, { samples: 20000, seed: 12345, distribution: 'uniform' });
    const cdf = (x: number) => productOfUniformsCdf(x, a, b);
    const tauHigh = quantile(cdf, 0.975, (1 - a) * (1 - b), (1 + a) * (1 + b));
    const tauLow = quantile(cdf, 0.025, (1 - a) * (1 - b), (1 + a) * (1 + b));
    // Low gain ↔ long τ ↔ low corner.
    const expectedLowCornerHz = NOMINAL_CORNER_HZ / tauHigh;
    const expectedHighCornerHz = NOMINAL_CORNER_HZ / tauLow;
    expect(cornerFromGainHz(band.gainLowDb[0], probeHz[0]) / expectedLowCornerHz).toBeGreaterThan(0.997);
    expect(cornerFromGainHz(band.gainLowDb[0], probeHz[0]) / expectedLowCornerHz).toBeLessThan(1.003);
    expect(cornerFromGainHz(band.gainHighDb[0], probeHz[0]) / expectedHighCornerHz).toBeGreaterThan(0.997);
    expect(cornerFromGainHz(band.gainHighDb[0], probeHz[0]) / expectedHighCornerHz).toBeLessThan(1.003);
    // The spread is real: about ±12 % on the corner, far wider than the test limits.
    expect(expectedHighCornerHz / expectedLowCornerHz).toBeGreaterThan(1.2);
  });

  it('the 2.5–97.5 % band holds 95 % of fresh builds drawn apart from it (± 4 standard errors); a widened band would not', () => {
    const a = 0.05;
    const b = 0.1;
    const band = monteCarloAc(rcLowPass(a, b), probeHz, { samples: 20000, seed: 2024, distribution: 'uniform' });
    const nominalDb = solveAc(rcLowPass(a, b), probeHz).gainDb[0];
    const interval: [number, number] = [band.gainLowDb[0], band.gainHighDb[0]];
    // Builds from the parts' distributions (uniform ±a on R, ±b on C), by an independent generator (mulberry32).
    const uniform = seededUniform(31);
    const omega = 2 * Math.PI * probeHz[0];
    const builds = 2000;
    const covered = { band: 0, widened: 0, narrowed: 0 };
    for (let k = 0; k < builds; k++) {
      const tauS = R0 * (1 + a * (2 * uniform() - 1)) * C0 * (1 + b * (2 * uniform() - 1));
      const gainDb = -10 * Math.log10(1 + (omega * tauS) ** 2); // |1/(1 + jωτ)| in dB
      if (covers(interval, gainDb)) covered.band++;
      if (covers(scaledInterval(interval, nominalDb, 1.5), gainDb)) covered.widened++;
      if (covers(scaledInterval(interval, nominalDb, 0.75), gainDb)) covered.narrowed++;
    }
    // The band's own sampling error (20,000 samples: about ±0.15 % of coverage) is small beside the check's ±1.9 %.
    const [low, high] = expectCoverage(covered.band, builds, 0.95, 'Monte Carlo band');
    expect(covered.widened / builds).toBeGreaterThan(high);
    expect(covered.narrowed / builds).toBeLessThan(low);
  });

  it('gaussian (σ = t/3, truncated at ±t) on R alone: edges match the truncated-normal quantiles', () => {
    const t = 0.05;
    const band = monteCarloAc(rcLowPass(t, undefined), probeHz, { samples: 20000, seed: 99, distribution: 'gaussian' });
    const tail = normalCdf(-3);
    const truncatedCdf = (z: number) => (normalCdf(z) - tail) / (1 - 2 * tail);
    const z975 = quantile(truncatedCdf, 0.975, -3, 3);
    const expectedLowCornerHz = NOMINAL_CORNER_HZ / (1 + (t * z975) / 3);
    const expectedHighCornerHz = NOMINAL_CORNER_HZ / (1 - (t * z975) / 3);
    expect(cornerFromGainHz(band.gainLowDb[0], probeHz[0]) / expectedLowCornerHz).toBeCloseTo(1, 3);
    expect(cornerFromGainHz(band.gainHighDb[0], probeHz[0]) / expectedHighCornerHz).toBeCloseTo(1, 3);
  });

  it('is reproducible for a seed and changes with the seed (common practice, no source)', () => {
    const design = rcLowPass(0.01, 0.05);
    const grid = Float64Array.from([100, 1000, 10000]);
    const first = monteCarloAc(design, grid, { samples: 200, seed: 7 });
    const again = monteCarloAc(design, grid, { samples: 200, seed: 7 });
    const other = monteCarloAc(design, grid, { samples: 200, seed: 8 });
    expect(Array.from(again.gainLowDb)).toEqual(Array.from(first.gainLowDb));
    expect(Array.from(again.phaseHighDeg)).toEqual(Array.from(first.phaseHighDeg));
    expect(Array.from(other.gainLowDb)).not.toEqual(Array.from(first.gainLowDb));
  });

  it('parts without a tolerance stay fixed: zero tolerance gives a band of zero width on the nominal curve', () => {
    const design = rcLowPass(0, undefined);
    const grid = Float64Array.from([100, 1000, 10000]);
    const band = monteCarloAc(design, grid, { samples: 50, seed: 1 });
    const nominal = solveAc(design, grid);
    for (let i = 0; i < grid.length; i++) {
      expect(band.gainLowDb[i]).toBe(nominal.gainDb[i]);
      expect(band.gainHighDb[i]).toBe(nominal.gainDb[i]);
      expect(band.phaseLowDeg[i]).toBeCloseTo(nominal.phaseDeg[i], 12);
    }
  });

  it('the band brackets the nominal response of an op-amp stage, phase on the same branch', () => {
    const design = parseDesign(
      {
        name: 'inverting low-pass (invented test circuit)',
        input: 'in',
        output: 'out',
        parts: [
          { id: 'R1', type: 'resistor', nodes: ['in', 'inv'], value: '1k', tolerance: 0.01 },
          { id: 'R2', type: 'resistor', nodes: ['inv', 'out'], value: '10k', tolerance: 0.01 },
          { id: 'C1', type: 'capacitor', nodes: ['inv', 'out'], value: '15n', tolerance: '5%' },
          { id: 'U1', type: 'opamp', nodes: ['0', 'inv', 'out'], model: { openLoopGain: 1e5, gbw: 1e6 } },
        ],
      },
      'inverting',
    );
    const grid = Float64Array.from([10, 1e3, 1e5]);
    const band = monteCarloAc(design, grid, { samples: 300, seed: 3 });
    const nominal = solveAc(design, grid);
    for (let i = 0; i < grid.length; i++) {
      expect(band.gainLowDb[i]).toBeLessThan(nominal.gainDb[i]);
      expect(band.gainHighDb[i]).toBeGreaterThan(nominal.gainDb[i]);
      expect(band.phaseLowDeg[i]).toBeLessThan(nominal.phaseDeg[i]);
      expect(band.phaseHighDeg[i]).toBeGreaterThan(nominal.phaseDeg[i]);
    }
  });
});
