/**
 * Run analysis on responses whose figures are known in closed form.
 * Circuits are evaluated here from handbook formulas (named beside each use),
 * not from app/circuit, so these tests check the analysis alone.
 */
import { describe, expect, it } from 'vitest';
import {
  analyzeAcRun,
  crossingsLogF,
  magnitudeGainLimitHz,
  loopGainLimitHz,
  minus3dbFrequenciesHz,
  passbandGainDb,
  rolloffDbPerDecade,
  HALF_POWER_DB,
} from '../../../app/analysis';
import { PointFlag } from '../../../app/contract/contract';
import { dbFromRatio, logGrid } from '../../../app/units';

/** First-order low-pass K/(1 + j f/fc): |H| is 3.0103 dB down at fc (handbook: single-pole RC, f_c = 1/(2πRC)). */
function firstOrderLowPassDb(frequencyHz: Float64Array, gain: number, cornerHz: number): Float64Array {
  return frequencyHz.map((f) => dbFromRatio(gain / Math.hypot(1, f / cornerHz)));
}

/**
 * Inverting stage with a single-pole op-amp (DEVELOPERS.md "Theory"):
 * H = −G/(1 + (1 + G)/A), A = A0/(1 + j f·A0/GBW). Returns |H| in dB.
 */
function invertingWithOpAmpDb(frequencyHz: Float64Array, gain: number, a0: number, gbwHz: number): Float64Array {
  return frequencyHz.map((f) => {
    // 1/A = (1 + j f A0/GBW)/A0
    const invARe = 1 / a0;
    const invAIm = f / gbwHz;
    const dRe = 1 + (1 + gain) * invARe;
    const dIm = (1 + gain) * invAIm;
    return dbFromRatio(gain / Math.hypot(dRe, dIm));
  });
}

/** Loop gain 1 point |A(f)| = noise gain, solved exactly: |A|² = A0²/(1 + (f A0/GBW)²). */
function loopGainOneHz(noiseGain: number, a0: number, gbwHz: number): number {
  return (gbwHz / a0) * Math.sqrt((a0 / noiseGain) ** 2 - 1);
}

describe('crossings interpolated in log f', () => {
  it('finds a straight-line crossing exactly (a line in (log f, dB) is interpolated without error)', () => {
    const f = Float64Array.from([100, 1000]);
    const y = Float64Array.from([0, -20]);
    // −20 dB/decade line: −10 dB at 10^2.5 Hz (arithmetic, common practice, no source).
    expect(crossingsLogF(f, y, -10)[0]).toBeCloseTo(10 ** 2.5, 6);
  });

  it('handles points that arrive out of frequency order (refinement points are appended)', () => {
    const f = Float64Array.from([1000, 100, 316.2]);
    const y = Float64Array.from([-20, 0, -10]);
    expect(crossingsLogF(f, y, -5)).toHaveLength(1);
  });
});

describe('pass band, −3 dB point and roll-off of a first-order low-pass', () => {
  const f = logGrid(10, 1e6, 10);
  const gainDb = firstOrderLowPassDb(f, 10, 1591.5);

  it('pass-band gain is 20·log10(10) = 20 dB (IEC 60027-3 definition of the decibel)', () => {
    expect(passbandGainDb(f, gainDb)).toBeCloseTo(20, 1);
  });

  it('−3 dB point lands on f_c = 1591.5 Hz within 1 % at 10 points per decade (handbook f_c = 1/(2πRC))', () => {
    const corners = minus3dbFrequenciesHz(f, gainDb, 20);
    expect(corners).toHaveLength(1);
    expect(corners[0] / 1591.5).toBeGreaterThan(0.99);
    expect(corners[0] / 1591.5).toBeLessThan(1.01);
  });

  it('roll-off is −20 dB/decade within 1 dB/decade (handbook: single-pole asymptote)', () => {
    const slope = rolloffDbPerDecade(f, gainDb, 20)!;
    expect(slope).toBeGreaterThan(-21);
    expect(slope).toBeLessThan(-19);
  });

  it('uses the low-frequency gain, not a resonant peak, when the low end is within 3 dB of the peak (as app/circuit summarizeAc)', () => {
    // Second-order low-pass, Q = 1.2: |H| = 1/√((1−x²)² + (x/Q)²), x = f/f0 (handbook second-order section);
    // peak Q/√(1 − 1/(4Q²)) ≈ 1.32, i.e. +2.4 dB, within 3 dB of the low end.
    const q = 1.2;
    const peaked = f.map((fr) => {
      const x = fr / 1000;
      return dbFromRatio(1 / Math.hypot(1 - x * x, x / q));
    });
    expect(passbandGainDb(f, peaked)).toBeCloseTo(0, 2);
  });

  it('a −3 dB half-power level is 20·log10(1/√2) = −3.0103 dB (IEC 60027-3)', () => {
    expect(HALF_POWER_DB).toBeCloseTo(-3.0103, 4);
  });
});

describe('measured gain-limit point of an inverting −100 stage, GBW 1 MHz', () => {
  const f = logGrid(100, 1e6, 20);
  const measuredDb = invertingWithOpAmpDb(f, 100, 1e5, 1e6);
  const idealDb = new Float64Array(f.length).fill(40);

  it('falls within 2 % of the loop-gain-1 point (|A| = noise gain 101, DEVELOPERS.md "Theory")', () => {
    const expected = loopGainOneHz(101, 1e5, 1e6); // ≈ 9.9 kHz
    const found = magnitudeGainLimitHz(f, measuredDb, idealDb)!;
    expect(Math.abs(found / expected - 1)).toBeLessThan(0.02);
  });

  it('is absent when the measurement follows the ideal response', () => {
    expect(magnitudeGainLimitHz(f, idealDb, idealDb)).toBeUndefined();
  });
});

describe('gain-limit point from the measured loop gain, reactive feedback', () => {
  // Inverting low-pass: Z_F = RF ∥ CF, Z_N = RN; NG = 1 + Z_F/Z_N has phase, so |H/H_ideal| = −3 dB is NOT loop gain 1.
  const RN = 1e3, RF = 100e3, CF = 100e-12, A0 = 1e5, GBW = 1e6;
  type C = [number, number];
  const mul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
  const div = (a: C, b: C): C => { const d = b[0] ** 2 + b[1] ** 2; return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d]; };
  const zf = (f: number): C => div([RF, 0], [1, 2 * Math.PI * f * RF * CF]);
  const ng = (f: number): C => { const r = div(zf(f), [RN, 0]); return [1 + r[0], r[1]]; };
  const openLoop = (f: number): C => div([A0, 0], [1, (f * A0) / GBW]); // single pole, DEVELOPERS.md "Theory"
  const idealH = (f: number): C => { const r = div(zf(f), [RN, 0]); return [-r[0], -r[1]]; };
  const realH = (f: number): C => { const q = div(ng(f), openLoop(f)); return div(idealH(f), [1 + q[0], q[1]]); };
  const db = (c: C) => dbFromRatio(Math.hypot(c[0], c[1]));
  const deg = (c: C) => (Math.atan2(c[1], c[0]) * 180) / Math.PI;
  // Exact loop-gain-1 point |A| = |NG| by bisection in log f (numerical, from the formulas above).
  let lo = 100, hi = 1e7;
  for (let k = 0; k < 100; k++) { const mid = Math.sqrt(lo * hi); if (Math.hypot(...openLoop(mid)) > Math.hypot(...ng(mid))) lo = mid; else hi = mid; }
  const exactHz = lo;
  const f = logGrid(100, 1e6, 10);
  const measured = Array.from(f, realH);
  const ideal = Array.from(f, idealH);

  it('finds the loop-gain-1 point within 1 % from measured gain and phase', () => {
    const found = loopGainLimitHz(f, measured.map(db), measured.map(deg), ideal.map(db), ideal.map(deg))!;
    expect(Math.abs(found / exactHz - 1)).toBeLessThan(0.01);
  });

  it('while the magnitude-only −3 dB rule lands well below it here (why the phase method is preferred)', () => {
    const magnitudeOnly = magnitudeGainLimitHz(f, measured.map(db), ideal.map(db))!;
    expect(magnitudeOnly / exactHz).toBeLessThan(0.8);
  });
});

describe('analyzeAcRun: flags, deviation and verdict', () => {
  // Starts two decades below the corner so the pass band is flat to < 0.05 dB.
  const f = logGrid(10, 1e5, 10);
  const theoryDb = firstOrderLowPassDb(f, 1, 1000);
  const zeros = new Float64Array(f.length);
  const uncertaintyDb = new Float64Array(f.length).fill(0.01);
  const theory = {
    gainDb: theoryDb,
    idealGainDb: theoryDb,
    bandLowDb: theoryDb.map((g) => g - 0.2),
    bandHighDb: theoryDb.map((g) => g + 0.2),
    gainLimitHz: 50_000,
    minus3dbHz: [1000],
  };

  it('passes when the measurement equals theory and flags points past the gain limit', () => {
    const result = analyzeAcRun(
      { frequencyHz: f, gainDb: theoryDb, gainUncertaintyDb: uncertaintyDb, phaseDeg: zeros, flags: new Int32Array(f.length) },
      theory,
      { maxDeviationDb: 0.1, cornerTolerance: 0.02, passbandGainDb: [-0.5, 0.5] },
    );
    expect(result.verdict?.pass).toBe(true);
    expect(result.figures.maxDeviationDb).toBeCloseTo(0, 12);
    const flaggedPast = f.filter((_, i) => (result.flags[i] & PointFlag.pastGainLimit) !== 0);
    expect(Array.from(flaggedPast)).toEqual(Array.from(f.filter((x) => x > 50_000)));
    expect(result.flags.some((fl) => (fl & PointFlag.outsideToleranceBand) !== 0)).toBe(false);
  });

  it('fails with reasons when a point strays beyond the band and the deviation limit', () => {
    const shifted = Float64Array.from(theoryDb);
    shifted[12] += 0.5; // 0.5 dB high at 158 Hz, inside the pass band
    const result = analyzeAcRun(
      { frequencyHz: f, gainDb: shifted, gainUncertaintyDb: uncertaintyDb, phaseDeg: zeros, flags: new Int32Array(f.length) },
      theory,
      { maxDeviationDb: 0.1 },
    );
    expect(result.verdict?.pass).toBe(false);
    expect(result.verdict?.reasons[0]).toMatch(/exceeds/);
    expect(result.figures.maxDeviationDb).toBeCloseTo(0.5, 9);
    expect(result.flags[12] & PointFlag.outsideToleranceBand).toBe(PointFlag.outsideToleranceBand);
  });

  it('gives no verdict without limits, and ignores overrange points for figures', () => {
    const flags = new Int32Array(f.length);
    const broken = Float64Array.from(theoryDb);
    broken[0] = 99;
    flags[0] = PointFlag.overrange;
    const result = analyzeAcRun({ frequencyHz: f, gainDb: broken, gainUncertaintyDb: uncertaintyDb, phaseDeg: zeros, flags }, theory, undefined);
    expect(result.verdict).toBeNull();
    expect(result.figures.passbandGainDb).toBeCloseTo(0, 1);
    expect(result.flags[0] & PointFlag.overrange).toBe(PointFlag.overrange);
  });
});
