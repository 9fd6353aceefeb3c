/**
 * Dense Gaussian elimination with partial pivoting, in place, for the small
 * MNA systems here. No allocation: callers own the arrays and reuse them in
 * hot loops (frequency sweeps, Monte Carlo).
 *
 * A pivot smaller than PIVOT_RELATIVE_FLOOR times the largest entry of its
 * original column means the system has no unique solution.
 */
const PIVOT_RELATIVE_FLOOR = 1e-13;

/**
 * Solves (aRe + j·aIm)·x = (bRe + j·bIm); the solution replaces b.
 * `columnScale` is scratch of length n. Returns -1 on success, else the
 * unknown whose pivot vanished (the system is singular there).
 */
export function solveComplexInPlace(
  n: number,
  aRe: Float64Array,
  aIm: Float64Array,
  bRe: Float64Array,
  bIm: Float64Array,
  columnScale: Float64Array,
): number {
  for (let j = 0; j < n; j++) {
    let scale = 0;
    for (let i = 0; i < n; i++) {
      const m = Math.abs(aRe[i * n + j]) + Math.abs(aIm[i * n + j]);
      if (m > scale) scale = m;
    }
    columnScale[j] = scale;
  }
  for (let k = 0; k < n; k++) {
    let pivotRow = k;
    let pivotSize = -1;
    for (let i = k; i < n; i++) {
      const m = Math.abs(aRe[i * n + k]) + Math.abs(aIm[i * n + k]);
      if (m > pivotSize) {
        pivotSize = m;
        pivotRow = i;
      }
    }
    if (!(pivotSize > PIVOT_RELATIVE_FLOOR * columnScale[k])) return k;
    if (pivotRow !== k) {
      for (let j = k; j < n; j++) {
        const r = k * n + j;
        const s = pivotRow * n + j;
        let t = aRe[r];
        aRe[r] = aRe[s];
        aRe[s] = t;
        t = aIm[r];
        aIm[r] = aIm[s];
        aIm[s] = t;
      }
      let t = bRe[k];
      bRe[k] = bRe[pivotRow];
      bRe[pivotRow] = t;
      t = bIm[k];
      bIm[k] = bIm[pivotRow];
      bIm[pivotRow] = t;
    }
    const pr = aRe[k * n + k];
    const pi = aIm[k * n + k];
    const pd = pr * pr + pi * pi;
    // 1/pivot
    const ir = pr / pd;
    const ii = -pi / pd;
    for (let i = k + 1; i < n; i++) {
      const er = aRe[i * n + k];
      const ei = aIm[i * n + k];
      if (er === 0 && ei === 0) continue;
      const fr = er * ir - ei * ii;
      const fi = er * ii + ei * ir;
      for (let j = k + 1; j < n; j++) {
        const kr = aRe[k * n + j];
        const ki = aIm[k * n + j];
        if (kr === 0 && ki === 0) continue;
        aRe[i * n + j] -= fr * kr - fi * ki;
        aIm[i * n + j] -= fr * ki + fi * kr;
      }
      bRe[i] -= fr * bRe[k] - fi * bIm[k];
      bIm[i] -= fr * bIm[k] + fi * bRe[k];
    }
  }
  for (let k = n - 1; k >= 0; k--) {
    let sr = bRe[k];
    let si = bIm[k];
    for (let j = k + 1; j < n; j++) {
      const ar = aRe[k * n + j];
      const ai = aIm[k * n + j];
      sr -= ar * bRe[j] - ai * bIm[j];
      si -= ar * bIm[j] + ai * bRe[j];
    }
    const pr = aRe[k * n + k];
    const pi = aIm[k * n + k];
    const pd = pr * pr + pi * pi;
    bRe[k] = (sr * pr + si * pi) / pd;
    bIm[k] = (si * pr - sr * pi) / pd;
  }
  return -1;
}

/** Real counterpart of solveComplexInPlace (DC operating points, pole estimate). */
export function solveRealInPlace(n: number, a: Float64Array, b: Float64Array, columnScale: Float64Array): number {
  for (let j = 0; j < n; j++) {
    let scale = 0;
    for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(a[i * n + j]));
    columnScale[j] = scale;
  }
  for (let k = 0; k < n; k++) {
    let pivotRow = k;
    let pivotSize = -1;
    for (let i = k; i < n; i++) {
      const m = Math.abs(a[i * n + k]);
      if (m > pivotSize) {
        pivotSize = m;
        pivotRow = i;
      }
    }
    if (!(pivotSize > PIVOT_RELATIVE_FLOOR * columnScale[k])) return k;
    if (pivotRow !== k) {
      for (let j = k; j < n; j++) {
        const t = a[k * n + j];
        a[k * n + j] = a[pivotRow * n + j];
        a[pivotRow * n + j] = t;
      }
      const t = b[k];
      b[k] = b[pivotRow];
      b[pivotRow] = t;
    }
    const inverse = 1 / a[k * n + k];
    for (let i = k + 1; i < n; i++) {
      const f = a[i * n + k] * inverse;
      if (f === 0) continue;
      for (let j = k + 1; j < n; j++) a[i * n + j] -= f * a[k * n + j];
      b[i] -= f * b[k];
    }
  }
  for (let k = n - 1; k >= 0; k--) {
    let s = b[k];
    for (let j = k + 1; j < n; j++) s -= a[k * n + j] * b[j];
    b[k] = s / a[k * n + k];
  }
  return -1;
}
