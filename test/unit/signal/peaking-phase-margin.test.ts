/**
 * Peaking → phase margin through the second-order loop. Sources:
 * - [OG] K. Ogata, "Modern Control Engineering", 5th ed. (2010): for
 *   T(s) = ωn²/(s(s + 2ζωn)), Mr = 1/(2ζ√(1 − ζ²)) (ζ ≤ 0.707) and
 *   PM = atan(2ζ/√(√(1 + 4ζ⁴) − 2ζ²)); tabulated pairs ζ = 0.5 ↔ PM 51.8°,
 *   Mr 1.25 dB; ζ = 0.3 ↔ PM 33.3° (recalled from memory).
 * - The circuit engine's own loop analysis (analyzeStability, itself checked
 *   against closed forms in test/unit/circuit/noise-stability.test.ts) on a
 *   follower whose op-amp is an integrator with one more pole: exactly that loop.
 */
import { describe, expect, it } from 'vitest';
import { analyzeStability, parseDesign } from '../../../app/circuit';
import { closedLoopPeakingDb, peakingDbFromDamping, phaseMarginFromDamping, phaseMarginFromPeakingDb } from '../../../app/signal';

describe('phase margin from closed-loop peaking [OG]', () => {
  it('textbook pairs', () => {
    expect(phaseMarginFromDamping(0.5)).toBeCloseTo(51.83, 2);
    expect(phaseMarginFromDamping(0.3)).toBeCloseTo(33.27, 2);
    expect(peakingDbFromDamping(0.5)).toBeCloseTo(20 * Math.log10(1 / (2 * 0.5 * Math.sqrt(0.75))), 12);
    expect(peakingDbFromDamping(0.5)).toBeCloseTo(1.249, 3);
    expect(peakingDbFromDamping(0.8)).toBe(0);
  });

  it('inverts the peak: ζ back from Mr on the ζ ≤ 1/√2 branch', () => {
    for (const zeta of [0.1, 0.25, 0.4, 0.6, 0.7]) {
      const estimate = phaseMarginFromPeakingDb(peakingDbFromDamping(zeta));
      expect(estimate.dampingRatio).toBeCloseTo(zeta, 9);
      expect(estimate.phaseMarginDeg).toBeCloseTo(phaseMarginFromDamping(zeta), 7);
      expect(estimate.lowerBoundOnly).toBe(false);
    }
    const flat = phaseMarginFromPeakingDb(0);
    expect(flat.lowerBoundOnly).toBe(true);
    expect(flat.phaseMarginDeg).toBeCloseTo(65.53, 2);
  });

  it('agrees with the circuit engine on an integrator-plus-pole loop (follower, A0 = 1e9)', () => {
    for (const secondPoleHz of [0.3e6, 0.6e6, 1.5e6]) {
      const follower = parseDesign(
        {
          name: 'follower (invented test circuit)',
          input: 'in',
          output: 'out',
          parts: [
            { id: 'U1', type: 'opamp', nodes: ['in', 'out', 'out'], model: { openLoopGain: 1e9, gbw: 1e6, secondPoleHz } },
            { id: 'RL', type: 'resistor', nodes: ['out', '0'], value: 1e6 },
          ],
        },
        'follower',
      );
      const [loop] = analyzeStability(follower);
      const estimate = phaseMarginFromPeakingDb(loop.peakingDb);
      expect(estimate.phaseMarginDeg).toBeCloseTo(loop.phaseMarginDeg!, 3);
    }
  });

  it('measured peaking: the maximum above the first point, never negative', () => {
    expect(closedLoopPeakingDb([0, 0.5, 2.1, 1, -20])).toBeCloseTo(2.1, 12);
    expect(closedLoopPeakingDb([6, 5, 3, -10])).toBe(0);
    expect(() => phaseMarginFromPeakingDb(NaN)).toThrow(/not a number/);
  });
});
