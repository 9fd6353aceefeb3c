/**
 * The coverage band of test/helpers/coverage.ts. Expected values by hand from
 * the binomial standard error √(p(1 − p)/m): m = 1000, p = 0.95 gives
 * 0.006892, so 4 of them are ±0.02757.
 */
import { describe, expect, it } from 'vitest';
import { coverageBand, covers, scaledInterval } from '../../helpers/coverage';

describe('coverage band', () => {
  it('is nominal ± 4 binomial standard errors', () => {
    const [low, high] = coverageBand(0.95, 1000);
    expect(low).toBeCloseTo(0.95 - 0.027568, 5);
    expect(high).toBeCloseTo(0.95 + 0.027568, 5);
  });

  it('refuses too few trials for the top of the band to stay below 100 % (a far too wide interval would pass)', () => {
    // m = 300: 0.95 + 4·√(0.0475/300) = 1.0003.
    expect(() => coverageBand(0.95, 300)).toThrow(/300 trials are too few/);
    expect(() => coverageBand(0.95, 320)).not.toThrow();
  });

  it('scales an interval about its estimate, linearly or on a log scale', () => {
    expect(scaledInterval([8, 11], 10, 2)).toEqual([6, 12]);
    const [low, high] = scaledInterval([5, 40], 10, 2, 'log'); // ratios 1/2 and 4, squared: 1/4 and 16
    expect(low).toBeCloseTo(2.5, 12);
    expect(high).toBeCloseTo(160, 12);
    expect(covers([1, 2], 1)).toBe(true);
    expect(covers([1, 2], 2.0001)).toBe(false);
  });
});
