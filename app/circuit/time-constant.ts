/**
 * Slowest time constant of a design, from its poles.
 *
 * The natural frequencies s solve det(G + s·C) = 0 with the input source
 * shorted (the MNA pencil). With M = G⁻¹·C this is det(I + s·M) = 0, so every
 * eigenvalue μ of M gives a pole s = −1/μ, and the slowest pole (smallest |s|)
 * is the eigenvalue of largest magnitude: τ = 1/|s|min = ρ(M), the spectral
 * radius of M. ρ(M) = lim ‖M^k‖^(1/k) (Gelfand's formula); repeated squaring
 * with renormalisation reaches k = 2^60 in 60 products, which makes the
 * estimate exact to rounding for the small matrices here.
 *
 * For an under-damped pair (quality factor Q) this is 1/ω0; its envelope
 * decays with 2Q/ω0, which a settling plan should allow for when Q > 0.5.
 * Nodes joined only through capacitors get GMIN = 1e-12 S to ground (as SPICE
 * does for DC), which shows up as a very slow, honest pole.
 */
import { SingularCircuitError } from './design-error';
import { solveRealInPlace } from './dense-solve';
import { buildLayout } from './layout';
import { allocatePencil, nominalValues, stampLinear } from './stamp';
import type { Design } from './types';

const SQUARINGS = 60;
const NODE_GMIN_S = 1e-12;

export function slowestTimeConstantS(design: Design, options: { idealOpAmps?: boolean } = {}): number {
  const layout = buildLayout(design);
  const n = layout.size;
  if (n === 0) return 0;
  const pencil = allocatePencil(n);
  stampLinear(design, layout, nominalValues(design), options.idealOpAmps ? 'ideal' : 'model', pencil);
  const m = inverseTimes(pencil.g, pencil.c, n, layout.labels, design.name, layout.nodeIndex);
  return spectralRadius(m, n);
}

/** Columns of G⁻¹·C, one solve per column of C. */
function inverseTimes(g: Float64Array, c: Float64Array, n: number, labels: string[], name: string, nodeIndex: Map<string, number>): Float64Array {
  const product = new Float64Array(n * n);
  const a = new Float64Array(n * n);
  const column = new Float64Array(n);
  const scale = new Float64Array(n);
  const isNode = new Set([...nodeIndex.values()].filter((v) => v >= 0));
  for (let j = 0; j < n; j++) {
    a.set(g);
    // GMIN only on nodes whose diagonal is empty (capacitor-only nodes).
    for (const i of isNode) if (a[i * n + i] === 0) a[i * n + i] = NODE_GMIN_S;
    for (let i = 0; i < n; i++) column[i] = c[i * n + j];
    const failed = solveRealInPlace(n, a, column, scale);
    if (failed >= 0) {
      throw new SingularCircuitError(`design "${name}": ${labels[failed]}`, `the DC equations have no unique solution (nothing fixes ${labels[failed]})`, 'Give every node a DC path to the rest of the circuit.');
    }
    for (let i = 0; i < n; i++) product[i * n + j] = column[i];
  }
  return product;
}

export function spectralRadius(matrix: Float64Array, n: number): number {
  let b = Float64Array.from(matrix);
  let next = new Float64Array(n * n);
  let norm = maxAbs(b);
  if (norm === 0) return 0;
  let logRadius = Math.log(norm);
  for (let i = 0; i < n * n; i++) b[i] /= norm;
  let weight = 1;
  for (let step = 0; step < SQUARINGS; step++) {
    for (let r = 0; r < n; r++) {
      for (let col = 0; col < n; col++) {
        let sum = 0;
        for (let k = 0; k < n; k++) sum += b[r * n + k] * b[k * n + col];
        next[r * n + col] = sum;
      }
    }
    norm = maxAbs(next);
    if (norm === 0) return 0; // nilpotent: every pole is at infinity
    weight /= 2;
    logRadius += weight * Math.log(norm);
    for (let i = 0; i < n * n; i++) next[i] /= norm;
    [b, next] = [next, b];
  }
  return Math.exp(logRadius);
}

function maxAbs(values: Float64Array): number {
  let m = 0;
  for (let i = 0; i < values.length; i++) m = Math.max(m, Math.abs(values[i]));
  return m;
}
