/**
 * Small dense linear algebra for fits (n ≤ ~10 parameters): row-major
 * Float64Array matrices. The inverse (for covariances) by Gauss–Jordan with
 * partial pivoting, which is plenty at this size; solves go to app/numeric.
 */
import { solveRealInPlace } from '../numeric/dense-solve';

/** Inverts an n×n matrix; returns undefined when it is singular to working precision. */
export function invertMatrix(matrix: Float64Array, n: number): Float64Array | undefined {
  const a = Float64Array.from(matrix);
  const inverse = new Float64Array(n * n);
  for (let i = 0; i < n; i++) inverse[i * n + i] = 1;
  let scale = 0;
  for (let i = 0; i < n * n; i++) scale = Math.max(scale, Math.abs(a[i]));
  if (scale === 0 || !Number.isFinite(scale)) return undefined;
  for (let col = 0; col < n; col++) {
    let pivotRow = col;
    for (let row = col + 1; row < n; row++) if (Math.abs(a[row * n + col]) > Math.abs(a[pivotRow * n + col])) pivotRow = row;
    const pivot = a[pivotRow * n + col];
    if (Math.abs(pivot) <= scale * 1e-14) return undefined;
    if (pivotRow !== col) {
      for (let k = 0; k < n; k++) {
        [a[col * n + k], a[pivotRow * n + k]] = [a[pivotRow * n + k], a[col * n + k]];
        [inverse[col * n + k], inverse[pivotRow * n + k]] = [inverse[pivotRow * n + k], inverse[col * n + k]];
      }
    }
    for (let k = 0; k < n; k++) {
      a[col * n + k] /= pivot;
      inverse[col * n + k] /= pivot;
    }
    for (let row = 0; row < n; row++) {
      if (row === col) continue;
      const factor = a[row * n + col];
      if (factor === 0) continue;
      for (let k = 0; k < n; k++) {
        a[row * n + k] -= factor * a[col * n + k];
        inverse[row * n + k] -= factor * inverse[col * n + k];
      }
    }
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
