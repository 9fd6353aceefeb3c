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
import { seededGaussian } from './seeded-random';

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

  it('gives 95 % intervals that cover the truth in about 95 % of noisy trials', () => {
    const gaussian = seededGaussian(123);
    const trials = 200;
    let covered = 0;
    for (let k = 0; k < trials; k++) {
      const data = times.map((t) => decay([truth.a, truth.tauS, truth.c], t) + 0.02 * gaussian());
      const result = levenbergMarquardt({
        parameters: [{ name: 'a', initial: 2 }, { name: 'tauS', initial: 0.01, logScale: true }, { name: 'c', initial: 0 }],
        residuals: (p) => times.map((t, i) => decay(p, t) - data[i]),
      });
      const [low, high] = result.confidenceIntervals[1];
      if (low <= truth.tauS && truth.tauS <= high) covered++;
    }
    // Binomial(200, 0.95) has standard deviation ≈ 3 %: 88…100 % is more than 2 standard deviations (no source needed).
    expect(covered / trials).toBeGreaterThan(0.88);
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

  it('covers the true n in most of many seeded trials', () => {
    const gaussian = seededGaussian(77);
    let covered = 0;
    const trials = 60;
    for (let k = 0; k < trials; k++) {
      const fit = fitLogStage(inputV, ideal.map((v) => v + 2e-4 * gaussian()), resistorOhm, temperatureC);
      if (fit.nCi[0] <= truth.n && truth.n <= fit.nCi[1]) covered++;
    }
    // Nominal 95 %; Binomial(60, 0.95) stays above 85 % with probability > 99 % (no source needed).
    expect(covered / trials).toBeGreaterThan(0.85);
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

  it('recovers GBW from gain/phase readings with noise, inside its interval', () => {
    const h = stage(3e6, 2e5);
    const gaussian = seededGaussian(55);
    const gainDb = h.re.map((re, i) => 20 * Math.log10(Math.hypot(re, h.im[i])) + 0.02 * gaussian());
    const phaseDeg = h.re.map((re, i) => (Math.atan2(h.im[i], re) * 180) / Math.PI + 0.2 * gaussian());
    const fit = fitSinglePoleOpAmp({
      frequenciesHz,
      measured: { gainDb, phaseDeg, gainUncertaintyDb: gainDb.map(() => 0.02), phaseUncertaintyDeg: phaseDeg.map(() => 0.2) },
      idealResponse: ideal,
      noiseGain,
    });
    expect(fit.gbwHz / 3e6).toBeGreaterThan(0.97);
    expect(fit.gbwHz / 3e6).toBeLessThan(1.03);
    expect(fit.gbwCi[0]).toBeLessThanOrEqual(3e6);
    expect(fit.gbwCi[1]).toBeGreaterThanOrEqual(3e6);
    expect(fit.gbwStdHz).toBeGreaterThan(0);
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
