/**
 * Small dense linear algebra for fits (n ≤ ~10 parameters): row-major
 * Float64Array matrices, on the one dense real solver of app/numeric.
 */
import { solveRealInPlace } from '../numeric/dense-solve';

/**
 * Inverts an n×n matrix (for covariances), column by column: column j of the
 * inverse solves A·x = e_j. Undefined when A is singular to working precision.
 */
export function invertMatrix(matrix: Float64Array, n: number): Float64Array | undefined {
  const inverse = new Float64Array(n * n);
  const unit = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    unit.fill(0);
    unit[j] = 1;
    const column = solveLinear(matrix, unit, n);
    if (!column || !column.every(Number.isFinite)) return undefined;
    for (let i = 0; i < n; i++) inverse[i * n + j] = column[i];
  }
  return inverse;
}

/**
 * Solves A·x = b (n×n); undefined when A is singular. The one dense real
 * solver (Gaussian elimination with partial pivoting, app/numeric), on copies:
 * better conditioned than multiplying by the inverse.
 */
export function solveLinear(matrix: Float64Array, rhs: Float64Array, n: number): Float64Array | undefined {
  const a = Float64Array.from(matrix);
  const x = Float64Array.from(rhs);
  return solveRealInPlace(n, a, x, new Float64Array(n)) === -1 ? x : undefined;
}
