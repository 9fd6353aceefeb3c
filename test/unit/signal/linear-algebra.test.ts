/**
 * invertMatrix and solveLinear against exact inverses: the Hilbert matrix
 * H_ij = 1/(i+j−1) has an integer inverse in closed form,
 * (H⁻¹)_ij = (−1)^(i+j) (i+j−1) C(n+i−1, n−j) C(n+j−1, n−i) C(i+j−2, i−1)²
 * (M.-D. Choi, "Tricks or treats with the Hilbert matrix", American
 * Mathematical Monthly 90 (1983) 301–312). Its condition number (~1.5e4 at
 * n = 4) makes it a fair test of pivoting at the fits' sizes.
 */
import { describe, expect, it } from 'vitest';
import { invertMatrix, solveLinear } from '../../../app/signal/linear-algebra';

function binomial(n: number, k: number): number {
  let c = 1;
  for (let i = 1; i <= k; i++) c = (c * (n - k + i)) / i;
  return c;
}

function hilbert(n: number): Float64Array {
  return Float64Array.from({ length: n * n }, (_, at) => 1 / (Math.floor(at / n) + (at % n) + 1));
}

function hilbertInverse(n: number): number[] {
  const out: number[] = [];
  for (let i = 1; i <= n; i++) {
    for (let j = 1; j <= n; j++) {
      out.push((-1) ** (i + j) * (i + j - 1) * binomial(n + i - 1, n - j) * binomial(n + j - 1, n - i) * binomial(i + j - 2, i - 1) ** 2);
    }
  }
  return out;
}

describe('dense inverse for covariances', () => {
  it('inverts the 4×4 Hilbert matrix to its integer inverse (relative error < 1e-10)', () => {
    const exact = hilbertInverse(4);
    expect(exact[0]).toBe(16); // first entry of the published 4×4 inverse
    const inverse = invertMatrix(hilbert(4), 4)!;
    for (let k = 0; k < 16; k++) expect(Math.abs(inverse[k] - exact[k]) / Math.abs(exact[k])).toBeLessThan(1e-10);
  });

  it('returns undefined for a singular matrix instead of infinities', () => {
    expect(invertMatrix(Float64Array.from([1, 2, 2, 4]), 2)).toBeUndefined();
    expect(invertMatrix(new Float64Array(9), 3)).toBeUndefined();
  });

  it('solveLinear gives the column of the exact inverse for a unit right-hand side, leaving its inputs alone', () => {
    const a = hilbert(3);
    const before = Float64Array.from(a);
    const x = solveLinear(a, Float64Array.from([0, 1, 0]), 3)!;
    const exact = hilbertInverse(3);
    for (let i = 0; i < 3; i++) expect(x[i]).toBeCloseTo(exact[i * 3 + 1], 8);
    expect(a).toEqual(before);
  });
});
