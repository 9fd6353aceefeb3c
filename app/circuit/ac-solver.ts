/**
 * Reusable single-frequency AC solver over one design: owns its workspace so
 * sweeps and Monte Carlo loops allocate nothing per point.
 */
import { buildLayout, GROUND, INPUT, type CircuitLayout } from './layout';
import { allocatePencil, nominalValues, stampLinear, type OpAmpMode, type Pencil } from './stamp';
import { solveComplexInPlace } from '../numeric/dense-solve';
import { SingularCircuitError } from './design-error';
import type { Design } from './types';

export class AcSolver {
  readonly layout: CircuitLayout;
  readonly pencil: Pencil;
  private readonly aRe: Float64Array;
  private readonly aIm: Float64Array;
  private readonly bRe: Float64Array;
  private readonly bIm: Float64Array;
  private readonly scale: Float64Array;

  constructor(readonly design: Design) {
    this.layout = buildLayout(design);
    const n = this.layout.size;
    this.pencil = allocatePencil(n);
    this.aRe = new Float64Array(n * n);
    this.aIm = new Float64Array(n * n);
    this.bRe = new Float64Array(n);
    this.bIm = new Float64Array(n);
    this.scale = new Float64Array(n);
  }

  /** Stamps the equations for the given part values (default: nominal). */
  stamp(mode: OpAmpMode, values: Float64Array = nominalValues(this.design)): void {
    stampLinear(this.design, this.layout, values, mode, this.pencil);
  }

  private load(frequencyHz: number, inputV: number): void {
    const { g, c, bG, bC, size } = this.pencil;
    const omega = 2 * Math.PI * frequencyHz;
    this.aRe.set(g);
    const aIm = this.aIm;
    for (let i = 0; i < size * size; i++) aIm[i] = omega * c[i];
    for (let i = 0; i < size; i++) {
      this.bRe[i] = bG[i] * inputV;
      this.bIm[i] = omega * bC[i] * inputV;
    }
  }

  private solve(frequencyHz: number): void {
    const failed = solveComplexInPlace(this.pencil.size, this.aRe, this.aIm, this.bRe, this.bIm, this.scale);
    if (failed >= 0) {
      const label = this.layout.labels[failed];
      throw new SingularCircuitError(
        `design "${this.design.name}": ${label}`,
        `the circuit equations have no unique solution at ${frequencyHz} Hz (nothing fixes ${label})`,
        'Check for a node joined to the rest only through an op-amp input, two sources driving one node, or a loop of inductors.',
        { node: label.startsWith('node ') ? label.slice(5) : undefined },
      );
    }
  }

  /**
   * Adjoint solve for the output: y with Aᵀ·y = e_out (transpose, not the
   * conjugate transpose), so the output voltage caused by any right-hand side
   * b is yᵀ·b. One solve gives the output's transimpedance from every
   * current or voltage injected anywhere (noise analysis). Fills yRe, yIm (length `layout.size`).
   */
  outputAdjointAt(frequencyHz: number, yRe: Float64Array, yIm: Float64Array): void {
    const { g, c, size } = this.pencil;
    const omega = 2 * Math.PI * frequencyHz;
    for (let i = 0; i < size; i++) {
      for (let j = 0; j < size; j++) {
        this.aRe[i * size + j] = g[j * size + i];
        this.aIm[i * size + j] = omega * c[j * size + i];
      }
    }
    this.bRe.fill(0);
    this.bIm.fill(0);
    this.bRe[this.layout.output] = 1;
    this.solve(frequencyHz);
    yRe.set(this.bRe);
    yIm.set(this.bIm);
  }

  /** Output voltage for a 1 V input: out[0] real, out[1] imaginary. */
  transferAt(frequencyHz: number, out: Float64Array): void {
    this.load(frequencyHz, 1);
    this.solve(frequencyHz);
    out[0] = this.bRe[this.layout.output];
    out[1] = this.bIm[this.layout.output];
  }

  /**
   * Feedback fraction β of op-amp `index`: with the input grounded, its output
   * is forced to 1 V and β = −(V+ − V−) is read back (negative feedback gives
   * a positive β at low frequency). Noise gain = 1/β, loop gain = A·β. With
   * an output resistance the loop is broken behind it (the gain stage's own
   * voltage is forced), so β includes Ro and the load it drives; at Ro = 0
   * that is the output pin.
   */
  feedbackFractionAt(index: number, frequencyHz: number, out: Float64Array): void {
    const slot = this.layout.opamps[index];
    const n = this.pencil.size;
    this.load(frequencyHz, 0);
    const row = slot.outputCurrent;
    for (let j = 0; j < n; j++) {
      this.aRe[row * n + j] = 0;
      this.aIm[row * n + j] = 0;
    }
    this.aRe[row * n + slot.out] = 1;
    if (slot.model.ideal !== true) this.aRe[row * n + slot.outputCurrent] = slot.model.outputResistanceOhm ?? 0;
    this.bRe[row] = 1;
    this.solve(frequencyHz);
    const voltage = (node: number, part: Float64Array): number => (node === GROUND || node === INPUT ? 0 : part[node]);
    out[0] = -(voltage(slot.plus, this.bRe) - voltage(slot.minus, this.bRe));
    out[1] = -(voltage(slot.plus, this.bIm) - voltage(slot.minus, this.bIm));
  }
}
