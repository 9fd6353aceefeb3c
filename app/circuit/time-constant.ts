/**
 * Poles and the slowest time constant of a design.
 *
 * The natural frequencies s solve det(G + s·C) = 0 with the input source
 * shorted (the MNA pencil). With M = G⁻¹·C this is det(I + s·M) = 0, so each
 * non-zero eigenvalue μ of M gives a pole s = −1/μ (zero eigenvalues belong
 * to algebraic constraints: poles at infinity). The eigenvalues come from the
 * QR algorithm in eigenvalues.ts.
 *
 * The slowest time constant is that of the slowest-decaying pole envelope,
 * max 1/|Re s|: for a real pole it is 1/|s| (RC for a first-order stage), for
 * an under-damped pair 2Q/ω0, which is what a settling plan must wait for.
 * An unstable or marginal circuit (Re s ≥ 0) never settles: Infinity.
 *
 * Nodes joined only through capacitors get GMIN = 1e-12 S to ground (as SPICE
 * does at DC), which shows up as a very slow, honest pole.
 */
import { SingularCircuitError } from './design-error';
import { solveRealInPlace } from '../numeric/dense-solve';
import { eigenvalues } from './eigenvalues';
import { buildLayout, type CircuitLayout } from './layout';
import { allocatePencil, nominalValues, stampLinear } from './stamp';
import type { Design } from './types';

const NODE_GMIN_S = 1e-12;
/** Eigenvalues this much smaller than the largest are zeros (poles at infinity). */
const ZERO_EIGENVALUE_RELATIVE = 1e-12;
/** A pole whose real part is not below −this·|s| does not decay. */
const STABILITY_MARGIN_RELATIVE = 1e-9;

export interface Poles {
  /** Real parts, rad/s, sorted by increasing |s|. */
  re: Float64Array;
  /** Imaginary parts, rad/s. */
  im: Float64Array;
}

export function circuitPoles(design: Design, options: { idealOpAmps?: boolean } = {}): Poles {
  const layout = buildLayout(design);
  const n = layout.size;
  if (n === 0) return { re: new Float64Array(0), im: new Float64Array(0) };
  const pencil = allocatePencil(n);
  stampLinear(design, layout, nominalValues(design), options.idealOpAmps ? 'ideal' : 'model', pencil);
  const m = inverseTimes(pencil.g, pencil.c, n, layout, design.name);
  const [muRe, muIm] = eigenvalues(m, n);
  let largest = 0;
  for (let i = 0; i < n; i++) largest = Math.max(largest, Math.hypot(muRe[i], muIm[i]));
  const poles: Array<[number, number]> = [];
  for (let i = 0; i < n; i++) {
    const size2 = muRe[i] * muRe[i] + muIm[i] * muIm[i];
    if (!(Math.sqrt(size2) > ZERO_EIGENVALUE_RELATIVE * largest)) continue;
    // s = −1/μ = −conj(μ)/|μ|²
    poles.push([-muRe[i] / size2, muIm[i] / size2]);
  }
  poles.sort((p, q) => Math.hypot(p[0], p[1]) - Math.hypot(q[0], q[1]));
  return { re: Float64Array.from(poles, (p) => p[0]), im: Float64Array.from(poles, (p) => p[1]) };
}

export function slowestTimeConstantS(design: Design, options: { idealOpAmps?: boolean } = {}): number {
  const poles = circuitPoles(design, options);
  let slowestS = 0;
  for (let i = 0; i < poles.re.length; i++) {
    const size = Math.hypot(poles.re[i], poles.im[i]);
    if (!(poles.re[i] < -STABILITY_MARGIN_RELATIVE * size)) return Infinity;
    slowestS = Math.max(slowestS, 1 / -poles.re[i]);
  }
  return slowestS;
}

/** Columns of G⁻¹·C, one solve per column of C. */
function inverseTimes(g: Float64Array, c: Float64Array, n: number, layout: CircuitLayout, name: string): Float64Array {
  const product = new Float64Array(n * n);
  const a = new Float64Array(n * n);
  const column = new Float64Array(n);
  const scale = new Float64Array(n);
  const nodes = [...layout.nodeIndex.values()].filter((v) => v >= 0);
  for (let j = 0; j < n; j++) {
    a.set(g);
    for (const i of nodes) if (a[i * n + i] === 0) a[i * n + i] = NODE_GMIN_S;
    for (let i = 0; i < n; i++) column[i] = c[i * n + j];
    const failed = solveRealInPlace(n, a, column, scale);
    if (failed >= 0) {
      const label = layout.labels[failed];
      throw new SingularCircuitError(`design "${name}": ${label}`, `the DC equations have no unique solution (nothing fixes ${label})`, 'Give every node a DC path to the rest of the circuit.');
    }
    for (let i = 0; i < n; i++) product[i * n + j] = column[i];
  }
  return product;
}
