import { describe, expect, it } from 'vitest';
import { ValidationError } from '../../../app/errors';
import {
  averageWithOutlierRejection,
  fitLogStage,
  fitSinglePoleOpAmp,
  levenbergMarquardt,
  logFitFigures,
  studentT95,
  studentTQuantile,
} from '../../../app/signal';
import { thermalVoltageV } from '../../../app/circuit/thermal-voltage';
import { seededGaussian } from '../../helpers/test-signals';
import { covers, expectCoverage, scaledInterval } from '../../helpers/coverage';
import { normalCdf } from '../../helpers/normal-distribution';

describe('Student-t quantiles', () => {
  it('match the published two-sided 95 % table', () => {
    // t(0.975, ν) from standard tables (e.g. NIST/SEMATECH e-Handbook §1.3.6.7.2; values recalled from memory).
    expect(studentT95(1)).toBeCloseTo(12.706, 3);
    expect(studentT95(2)).toBeCloseTo(4.303, 3);
    expect(studentT95(10)).toBeCloseTo(2.228, 3);
    expect(studentT95(30)).toBeCloseTo(2.042, 3);
    expect(studentT95(1e9)).toBeCloseTo(1.96, 2);
    expect(studentTQuantile(0.025, 10)).toBeCloseTo(-2.228, 3);
    expect(() => studentTQuantile(1, 3)).toThrow(ValidationError);
  });
});

describe('levenbergMarquardt', () => {
  // Model y = a·exp(−t/τ) + c; truth invented for the test (common practice, no source).
  const truth = { a: 2.5, tauS: 0.013, c: 0.3 };
  const times = Float64Array.from({ length: 60 }, (_, i) => i * 1e-3);
  const decay = (p: ArrayLike<number>, t: number) => p[0] * Math.exp(-t / p[1]) + p[2];

  it('recovers the parameters of noiseless data from a poor start', () => {
    const data = times.map((t) => decay([truth.a, truth.tauS, truth.c], t));
    const result = levenbergMarquardt({
      parameters: [{ name: 'a', initial: 1 }, { name: 'tauS', initial: 0.002, logScale: true }, { name: 'c', initial: 0 }],
      residuals: (p) => times.map((t, i) => decay(p, t) - data[i]),
    });
    expect(result.params[0]).toBeCloseTo(truth.a, 8);
    expect(result.params[1]).toBeCloseTo(truth.tauS, 10);
    expect(result.params[2]).toBeCloseTo(truth.c, 8);
    expect(['small-cost-change', 'small-step', 'small-gradient', 'exact-fit']).toContain(result.reason);
  });

  it('gives 95 % intervals that cover the truth in 95 % of noisy trials (± 4 standard errors), not more, not less', () => {
    const gaussian = seededGaussian(123);
    const trials = 1000;
    const covered = { stated: 0, widened: 0, narrowed: 0 };
    for (let k = 0; k < trials; k++) {
      const data = times.map((t) => decay([truth.a, truth.tauS, truth.c], t) + 0.02 * gaussian());
      const result = levenbergMarquardt({
        parameters: [{ name: 'a', initial: 2 }, { name: 'tauS', initial: 0.01, logScale: true }, { name: 'c', initial: 0 }],
        residuals: (p) => times.map((t, i) => decay(p, t) - data[i]),
      });
      const interval = result.confidenceIntervals[1];
      if (covers(interval, truth.tauS)) covered.stated++;
      // τ is fitted on a log scale, so its interval is scaled there.
      if (covers(scaledInterval(interval, result.params[1], 1.5, 'log'), truth.tauS)) covered.widened++;
      if (covers(scaledInterval(interval, result.params[1], 0.75, 'log'), truth.tauS)) covered.narrowed++;
    }
    const [low, high] = expectCoverage(covered.stated, trials, 0.95, 'τ interval');
    // The check can fail both ways: the same intervals 1.5× as wide (≈ 99.7 %) or ¾ as wide (≈ 86 %) are caught.
    expect(covered.widened / trials).toBeGreaterThan(high);
    expect(covered.narrowed / trials).toBeLessThan(low);
  });

  it('uses an analytic Jacobian when given and agrees with the numerical one', () => {
    const gaussian = seededGaussian(9);
    const data = times.map((t) => decay([truth.a, truth.tauS, truth.c], t) + 0.01 * gaussian());
    const base = {
      parameters: [{ name: 'a', initial: 2 }, { name: 'tauS', initial: 0.01 }, { name: 'c', initial: 0 }],
      residuals: (p: Float64Array) => times.map((t, i) => decay(p, t) - data[i]),
    };
    const numerical = levenbergMarquardt(base);
    const analytic = levenbergMarquardt({
      ...base,
      jacobian: (p) => {
        const jac = new Float64Array(times.length * 3);
        times.forEach((t, i) => {
          const e = Math.exp(-t / p[1]);
          jac[i * 3] = e;
          jac[i * 3 + 1] = (p[0] * e * t) / (p[1] * p[1]);
          jac[i * 3 + 2] = 1;
        });
        return jac;
      },
    });
    for (let j = 0; j < 3; j++) {
      expect(analytic.params[j]).toBeCloseTo(numerical.params[j], 6);
      expect(analytic.standardErrors[j] / numerical.standardErrors[j]).toBeCloseTo(1, 4);
    }
  });

  it('holds a parameter inside its bounds and reports it', () => {
    // Data from c = 0.3 but c is bounded to ≤ 0.1: the fit must stop on the bound.
    const data = times.map((t) => decay([truth.a, truth.tauS, truth.c], t));
    const result = levenbergMarquardt({
      parameters: [{ name: 'a', initial: 2 }, { name: 'tauS', initial: 0.01, logScale: true }, { name: 'c', initial: 0, upper: 0.1 }],
      residuals: (p) => times.map((t, i) => decay(p, t) - data[i]),
    });
    expect(result.params[2]).toBeLessThanOrEqual(0.1);
    expect(result.atBound).toEqual(['c']);
  });

  it('with standardized residuals, trusts the given uncertainties unless the scatter exceeds them', () => {
    // Straight line y = 2t + 1 through points with σ = 0.1 (common practice, no source). With scatter matching σ the
    // slope's std is σ/√Σ(t − t̄)²; scatter ten times σ must enlarge it by about √(χ²/ν) ≈ 10.
    const t = Float64Array.from({ length: 50 }, (_, i) => i / 10);
    const gaussian = seededGaussian(4);
    const noise = t.map(() => gaussian());
    const fitWith = (scatter: number) =>
      levenbergMarquardt({
        parameters: [{ name: 'slope', initial: 1 }, { name: 'intercept', initial: 0 }],
        residuals: (p) => t.map((x, i) => (p[0] * x + p[1] - (2 * x + 1 + scatter * noise[i])) / 0.1),
        residualsAreStandardized: true,
      });
    const mean = t.reduce((a, b) => a + b, 0) / t.length;
    const expectedStd = 0.1 / Math.sqrt(t.reduce((a, x) => a + (x - mean) ** 2, 0));
    expect(fitWith(0.1).standardErrors[0] / expectedStd).toBeGreaterThan(0.99);
    expect(fitWith(0.1).standardErrors[0] / expectedStd).toBeLessThan(1.3);
    const ratio = fitWith(1).standardErrors[0] / expectedStd;
    expect(ratio).toBeGreaterThan(7);
    expect(ratio).toBeLessThan(13);
  });

  it('refuses impossible set-ups with clear errors', () => {
    expect(() => levenbergMarquardt({ parameters: [{ name: 'x', initial: -1, logScale: true }], residuals: () => new Float64Array(3) })).toThrow(/positive/);
    expect(() => levenbergMarquardt({ parameters: [{ name: 'x', initial: 1 }, { name: 'y', initial: 1 }], residuals: () => new Float64Array(1) })).toThrow(/cannot determine/);
  });
});

describe('fitLogStage', () => {
  // Invented diode: n = 1.9, I_S = 2.5 nA, R_S = 8 Ω, R = 10 kΩ, 25 °C.
  const truth = { n: 1.9, isA: 2.5e-9, rsOhm: 8 };
  const resistorOhm = 10e3;
  const temperatureC = 25;
  const inputV = Float64Array.from({ length: 31 }, (_, i) => 1e-3 * 10 ** (i / 7.5)); // 1 mV … 10 V
  const vt = thermalVoltageV(temperatureC);
  const ideal = inputV.map((v) => {
    const current = v / resistorOhm;
    return -(truth.n * vt * Math.log(current / truth.isA + 1) + current * truth.rsOhm); // log-stage equation, DEVELOPERS.md "Theory"
  });

  it('uses V_T = kT/q from the exact SI constants', () => {
    // k = 1.380649e-23 J/K, q = 1.602176634e-19 C (exact, CODATA 2018): V_T(25 °C) = 25.6926 mV.
    expect(thermalVoltageV(25)).toBeCloseTo(0.0256926, 7);
  });

  it('recovers n, I_S and R_S from noisy readings with the truth inside the 95 % intervals', () => {
    const gaussian = seededGaussian(2024);
    const outputV = ideal.map((v) => v + 2e-4 * gaussian());
    const fit = fitLogStage(inputV, outputV, resistorOhm, temperatureC);
    expect(fit.n).toBeCloseTo(truth.n, 1);
    expect(fit.isA / truth.isA).toBeGreaterThan(0.7);
    expect(fit.isA / truth.isA).toBeLessThan(1.4);
    expect(fit.nCi[0]).toBeLessThanOrEqual(truth.n);
    expect(fit.nCi[1]).toBeGreaterThanOrEqual(truth.n);
    expect(fit.isCi[0]).toBeLessThanOrEqual(truth.isA);
    expect(fit.isCi[1]).toBeGreaterThanOrEqual(truth.isA);
    expect(fit.rsCi[0]).toBeLessThanOrEqual(truth.rsOhm);
    expect(fit.rsCi[1]).toBeGreaterThanOrEqual(truth.rsOhm);
    expect(fit.isCi[0]).toBeGreaterThan(0); // fitted in log space: the interval stays positive
    expect(Object.keys(logFitFigures(fit)).sort()).toEqual(['isA', 'isCi', 'n', 'nCi', 'rsCi', 'rsOhm']);
  });

  it('its 95 % intervals of n, I_S and R_S cover the truth in 95 % of seeded trials (± 4 standard errors)', () => {
    const gaussian = seededGaussian(77);
    const trials = 1000;
    const covered = { n: 0, isA: 0, rsOhm: 0, nWidened: 0, nNarrowed: 0 };
    for (let k = 0; k < trials; k++) {
      const fit = fitLogStage(inputV, ideal.map((v) => v + 2e-4 * gaussian()), resistorOhm, temperatureC);
      if (covers(fit.nCi, truth.n)) covered.n++;
      if (covers(fit.isCi, truth.isA)) covered.isA++;
      if (covers(fit.rsCi, truth.rsOhm)) covered.rsOhm++;
      if (covers(scaledInterval(fit.nCi, fit.n, 1.5), truth.n)) covered.nWidened++;
      if (covers(scaledInterval(fit.nCi, fit.n, 0.75), truth.n)) covered.nNarrowed++;
    }
    const [low, high] = expectCoverage(covered.n, trials, 0.95, 'n interval');
    expectCoverage(covered.isA, trials, 0.95, 'I_S interval');
    expectCoverage(covered.rsOhm, trials, 0.95, 'R_S interval');
    // A far too wide interval (1.5×) or a too narrow one (¾) of n fails the same check.
    expect(covered.nWidened / trials).toBeGreaterThan(high);
    expect(covered.nNarrowed / trials).toBeLessThan(low);
  });

  it('fits a stage driven with negative input by mirroring both axes', () => {
    const fit = fitLogStage(inputV.map((v) => -v), ideal.map((v) => -v), resistorOhm, temperatureC);
    expect(fit.mirrored).toBe(true);
    expect(fit.n).toBeCloseTo(truth.n, 6);
    expect(fit.rsOhm).toBeCloseTo(truth.rsOhm, 3);
  });

  it('refuses unusable inputs with the place named', () => {
    expect(() => fitLogStage([0.1, -0.1, 0.2, 0.3], [1, 2, 3, 4], resistorOhm, 25)).toThrow(/mixes positive/);
    expect(() => fitLogStage([0.1, 0.2, 0.3], [1, 2, 3], resistorOhm, 25)).toThrow(/at least 4/);
    expect(() => fitLogStage([0.1, 0.2, Number.NaN, 0.4], [1, 2, 3, 4], resistorOhm, 25)).toThrow(/inputV\[2\]/);
    expect(() => fitLogStage(inputV, ideal, 0, 25)).toThrow(/inputResistorOhm/);
    expect(() => fitLogStage(inputV, ideal, resistorOhm, 400)).toThrow(/temperatureC/);
  });
});

describe('fitSinglePoleOpAmp', () => {
  // Inverting stage, gain −10: H_ideal = −10, noise gain 11 (DEVELOPERS.md "Theory"). GBW and A0 invented.
  const frequenciesHz = Float64Array.from({ length: 25 }, (_, i) => 1e3 * 10 ** (i / 8)); // 1 kHz … 1 MHz
  function stage(gbwHz: number, a0: number) {
    const re: number[] = [], im: number[] = [];
    for (const f of frequenciesHz) {
      // H = H_ideal/(1 + NG·(1/A0 + j f/GBW))
      const dRe = 1 + 11 / a0, dIm = (11 * f) / gbwHz;
      const den = dRe * dRe + dIm * dIm;
      re.push((-10 * dRe) / den);
      im.push((10 * dIm) / den);
    }
    return { re, im };
  }
  const ideal = { re: Array.from(frequenciesHz, () => -10), im: Array.from(frequenciesHz, () => 0) };
  const noiseGain = { re: Array.from(frequenciesHz, () => 11), im: Array.from(frequenciesHz, () => 0) };

  /** The fit of stage h read with 0.02 dB and 0.2° of Gaussian noise, those uncertainties stated with the readings. */
  function fitNoisyReadings(h: { re: number[]; im: number[] }, gaussian: () => number) {
    const gainDb = h.re.map((re, i) => 20 * Math.log10(Math.hypot(re, h.im[i])) + 0.02 * gaussian());
    const phaseDeg = h.re.map((re, i) => (Math.atan2(h.im[i], re) * 180) / Math.PI + 0.2 * gaussian());
    return fitSinglePoleOpAmp({
      frequenciesHz,
      measured: { gainDb, phaseDeg, gainUncertaintyDb: gainDb.map(() => 0.02), phaseUncertaintyDeg: phaseDeg.map(() => 0.2) },
      idealResponse: ideal,
      noiseGain,
    });
  }

  it('recovers GBW from gain/phase readings with noise, inside its interval', () => {
    const fit = fitNoisyReadings(stage(3e6, 2e5), seededGaussian(55));
    expect(fit.gbwHz / 3e6).toBeGreaterThan(0.97);
    expect(fit.gbwHz / 3e6).toBeLessThan(1.03);
    expect(fit.gbwCi[0]).toBeLessThanOrEqual(3e6);
    expect(fit.gbwCi[1]).toBeGreaterThanOrEqual(3e6);
    expect(fit.gbwStdHz).toBeGreaterThan(0);
  });

  it('its interval and 1σ cover the truth as often as its rule says, over seeded trials (± 4 standard errors)', () => {
    // With stated uncertainties the fit scales them up when the scatter exceeds them, never down (σ·max(1, s),
    // s² = χ²/ν with ν = 50 readings − 1 parameter), with the normal factor 1.96. With right uncertainties, so,
    // the ±k·σ interval covers with probability E[2Φ(k·max(1, s)) − 1], s² ~ χ²_ν/ν independent of the estimate
    // (least squares in Gaussian noise): 95.7 % for k = 1.96 and 70.0 % for k = 1, a little above 95 % and
    // 68.3 % by design (conservative). Computed below by integrating over the χ² density.
    const expectedCoverage = (k: number, nu: number) => {
      const logDensity = (x: number) => (nu / 2 - 1) * Math.log(x) - x / 2; // χ²_ν up to its constant
      const peak = logDensity(nu - 2);
      let weight = 0;
      let covered = 0;
      const steps = 20000;
      const top = nu + 20 * Math.sqrt(2 * nu);
      for (let i = 1; i < steps; i++) {
        const x = (i * top) / steps;
        const density = Math.exp(logDensity(x) - peak);
        weight += density;
        covered += density * (2 * normalCdf(k * Math.max(1, Math.sqrt(x / nu))) - 1);
      }
      return covered / weight;
    };
    const h = stage(3e6, 2e5);
    const gaussian = seededGaussian(55);
    const trials = 1000;
    const covered = { ci: 0, oneSigma: 0, widened: 0, narrowed: 0 };
    for (let k = 0; k < trials; k++) {
      const fit = fitNoisyReadings(h, gaussian);
      if (covers(fit.gbwCi, 3e6)) covered.ci++;
      if (Math.abs(fit.gbwHz - 3e6) <= fit.gbwStdHz) covered.oneSigma++;
      if (covers(scaledInterval(fit.gbwCi, fit.gbwHz, 1.5, 'log'), 3e6)) covered.widened++;
      if (covers(scaledInterval(fit.gbwCi, fit.gbwHz, 0.75, 'log'), 3e6)) covered.narrowed++;
    }
    const nu = 2 * frequenciesHz.length - 1;
    const expected95 = expectedCoverage(1.96, nu);
    expect(expected95).toBeGreaterThan(0.95);
    expect(expected95).toBeLessThan(0.965);
    const [low, high] = expectCoverage(covered.ci, trials, expected95, 'GBW 95 % interval');
    expectCoverage(covered.oneSigma, trials, expectedCoverage(1, nu), 'GBW ±1σ');
    expect(covered.widened / trials).toBeGreaterThan(high);
    expect(covered.narrowed / trials).toBeLessThan(low);
  });

  it('also fits A0 when the data show the low-frequency gain error', () => {
    const h = stage(1e6, 300);
    const fit = fitSinglePoleOpAmp({ frequenciesHz, measured: h, idealResponse: ideal, noiseGain, fitOpenLoopGain: true });
    expect(fit.gbwHz).toBeCloseTo(1e6, -1);
    expect(fit.openLoopGain!.value).toBeCloseTo(300, 3);
  });

  it('refuses mismatched columns', () => {
    expect(() => fitSinglePoleOpAmp({ frequenciesHz, measured: { gainDb: [1, 2], phaseDeg: [1, 2] }, idealResponse: ideal, noiseGain })).toThrow(/measured.gainDb/);
  });
});

describe('averageWithOutlierRejection (modified z-score, Iglewicz & Hoaglin 1993)', () => {
  it('rejects the wild reading and averages the rest', () => {
    // By hand: median 10.025, MAD 0.075; M(50) = 0.6745·39.975/0.075 ≈ 359 > 3.5, M(9.9) ≈ 1.12 kept; mean of the
    // five kept = 50/5 = 10; their sample std = 0.0791, std error = 0.0354.
    const result = averageWithOutlierRejection([10.0, 10.1, 9.9, 10.05, 9.95, 50]);
    expect(result.rejectedIndices).toEqual([5]);
    expect(result.mean).toBeCloseTo(10, 12);
    expect(result.keptCount).toBe(5);
    expect(result.standardError).toBeCloseTo(0.0354, 4);
  });

  it('keeps everything when nothing stands out, and refuses empty or non-finite input', () => {
    expect(averageWithOutlierRejection([1, 2, 3, 4]).rejectedIndices).toEqual([]);
    expect(() => averageWithOutlierRejection([])).toThrow(/empty/);
    expect(() => averageWithOutlierRejection([1, Number.POSITIVE_INFINITY])).toThrow(/values\[1\]/);
  });
});
