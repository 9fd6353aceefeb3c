/**
 * Phase margin estimated from a sweep's peaking. Expected values: a follower on
 * a two-pole op-amp with A0 → ∞ has the loop T = GBW/(jf·(1 + jf/f2)); its
 * crossover solves (GBW/f)² = 1 + (f/f2)², i.e. f_c² = f2²·(√(1 + 4·GBW²/f2²) − 1)/2,
 * and its phase margin is 90° − atan(f_c/f2) (Bode's definition, closed form
 * derived here; see also K. Ogata, Modern Control Engineering, ch. 7). The
 * "measured" gain is the theory engine's response of that follower (0 dB ideal).
 */
import { describe, expect, it } from 'vitest';
import { measuredStability } from '../../../app/analysis';
import { parseDesign, solveAc } from '../../../app/circuit';
import { logGrid } from '../../../app/units';

function followerGainDb(gbwHz: number, secondPoleHz: number, frequenciesHz: Float64Array): Float64Array {
  const design = parseDesign({
    name: 'follower on a two-pole op-amp (invented)',
    input: 'in',
    output: 'out',
    parts: [
      { id: 'U1', type: 'opamp', nodes: ['in', 'out', 'out'], model: { openLoopGain: 1e8, gbw: gbwHz, secondPoleHz } },
      { id: 'RL', type: 'resistor', nodes: ['out', '0'], value: 1e9 },
    ],
  });
  return solveAc(design, frequenciesHz).gainDb;
}

const closedFormPhaseMarginDeg = (gbwHz: number, f2: number) => {
  const fc = f2 * Math.sqrt((Math.sqrt(1 + (4 * gbwHz * gbwHz) / (f2 * f2)) - 1) / 2);
  return 90 - (Math.atan(fc / f2) * 180) / Math.PI;
};

describe('measuredStability', () => {
  for (const ratio of [0.5, 1, 1.5]) {
    it(`two-pole follower, second pole at ${ratio}× GBW: margin from the peaking equals the Bode margin`, () => {
      const gbw = 1e6;
      const frequencies = logGrid(1e3, 1e8, 400);
      const gainDb = followerGainDb(gbw, ratio * gbw, frequencies);
      const result = measuredStability(gainDb, new Float64Array(frequencies.length))!;
      expect(result.phaseMarginEstimateIsLowerBound).toBe(false);
      expect(result.closedLoopPeakingDb).toBeGreaterThan(0);
      // The loop is exactly second order, so only the grid's sampling of the peak (400 points/decade) is left.
      expect(result.phaseMarginEstimateDeg).toBeCloseTo(closedFormPhaseMarginDeg(gbw, ratio * gbw), 1);
    });
  }

  it('no peaking: a lower bound only', () => {
    const frequencies = logGrid(1e3, 1e8, 50);
    const result = measuredStability(followerGainDb(1e6, 10e6, frequencies), new Float64Array(frequencies.length))!;
    expect(result.closedLoopPeakingDb).toBe(0);
    expect(result.phaseMarginEstimateIsLowerBound).toBe(true);
    expect(result.phaseMarginEstimateDeg).toBeCloseTo(65.5, 1);
  });

  it('needs three usable points', () => {
    expect(measuredStability([0, NaN, 1], [0, 0, 0])).toBeUndefined();
  });
});
