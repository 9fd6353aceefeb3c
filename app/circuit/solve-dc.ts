/**
 * DC transfer: output voltage for each input level, by Newton iteration on
 * the MNA equations at s = 0 (capacitors open, inductors shorted).
 *
 * Diodes: Shockley I = IS·(exp(V/(n·VT)) − 1) plus series RS (an internal
 * node), with GMIN = 1e-12 S across each junction as SPICE does, and the
 * junction-voltage limiting of SPICE (pnjlim) so exponentials never blow up.
 * Op-amps: finite A0 (ideal ones: nullor), input offset added to the
 * non-inverting input, bias current drawn from each input node.
 * Each level starts from the previous solution (continuation along the sweep).
 */
import { DcConvergenceError, SingularCircuitError } from './design-error';
import { solveRealInPlace } from '../numeric/dense-solve';
import { buildLayout, GROUND, INPUT } from './layout';
import { allocatePencil, JUNCTION_GMIN_S, nominalValues, stampLinear } from './stamp';
import { thermalVoltageV } from './thermal-voltage';
import type { Design, DiodePart } from './types';

export interface DcTransfer {
  inputV: Float64Array;
  outputV: Float64Array;
  /** Newton iterations per input level. */
  iterations: Int32Array;
  /** 1 where the output op-amp would pass its rails; outputV is then held at the rail. */
  clipped: Uint8Array;
}

const MAX_ITERATIONS = 300;
const VOLTAGE_ABSTOL_V = 1e-9;
const RELTOL = 1e-9;

export function solveDcTransfer(design: Design, inputsV: Float64Array, options: { idealOpAmps?: boolean } = {}): DcTransfer {
  const layout = buildLayout(design);
  const n = layout.size;
  const pencil = allocatePencil(n);
  stampLinear(design, layout, nominalValues(design), options.idealOpAmps ? 'ideal' : 'model', pencil, false);
  const { g, bG } = pencil;

  // Constant sources: offsets and bias currents.
  const constantRhs = new Float64Array(n);
  for (const slot of layout.opamps) {
    const model = slot.model;
    if (model.inputOffsetV !== undefined && model.inputOffsetV !== 0) {
      if (model.ideal || options.idealOpAmps) {
        constantRhs[slot.outputCurrent] -= model.inputOffsetV;
      } else constantRhs[slot.pole1] += model.openLoopGain * model.inputOffsetV;
    }
    if (model.inputBiasA !== undefined && model.inputBiasA !== 0) {
      if (slot.plus >= 0) constantRhs[slot.plus] -= model.inputBiasA;
      if (slot.minus >= 0) constantRhs[slot.minus] -= model.inputBiasA;
    }
  }

  const diodes = layout.diodes.map((slot) => {
    const part = design.parts[slot.partIndex] as DiodePart;
    const vt = part.model.n * thermalVoltageV(design.temperatureC);
    return { slot, model: part.model, vt, vcrit: vt * Math.log(vt / (Math.SQRT2 * part.model.is)) };
  });
  const junctionV = new Float64Array(diodes.length);

  const a = new Float64Array(n * n);
  const x = new Float64Array(n);
  const previousX = new Float64Array(n);
  const scale = new Float64Array(n);
  const voltage = (node: number, inputV: number, values: Float64Array): number => (node === GROUND ? 0 : node === INPUT ? inputV : values[node]);

  const result: DcTransfer = {
    inputV: Float64Array.from(inputsV),
    outputV: new Float64Array(inputsV.length),
    iterations: new Int32Array(inputsV.length),
    clipped: new Uint8Array(inputsV.length),
  };
  // The op-amp driving the output node saturates at its rails; the linear
  // macro-model does not, so its reported output is held there (loads behind
  // a saturated output are not re-solved).
  const rails = layout.opamps.find((slot) => slot.out === layout.output)?.model.rails;
  for (let level = 0; level < inputsV.length; level++) {
    const inputV = inputsV[level];
    let converged = false;
    let iteration = 0;
    while (!converged && iteration < MAX_ITERATIONS) {
      iteration++;
      a.set(g);
      for (let i = 0; i < n; i++) x[i] = bG[i] * inputV + constantRhs[i];
      for (let k = 0; k < diodes.length; k++) {
        const { slot, model, vt } = diodes[k];
        const vd = junctionV[k];
        const e = Math.exp(vd / vt);
        const conductance = (model.is * e) / vt + JUNCTION_GMIN_S;
        const current = model.is * (e - 1) + JUNCTION_GMIN_S * vd;
        // Companion model: I ≈ current + conductance·(V − vd), junction from `junction` to cathode.
        stampConductance(a, x, n, slot.junction, slot.cathode, conductance, inputV);
        const equivalent = current - conductance * vd;
        if (slot.junction >= 0) x[slot.junction] -= equivalent;
        if (slot.cathode >= 0) x[slot.cathode] += equivalent;
        if (slot.junction !== slot.anode) stampConductance(a, x, n, slot.anode, slot.junction, 1 / model.rs, inputV);
      }
      const failed = solveRealInPlace(n, a, x, scale);
      if (failed >= 0) {
        const label = layout.labels[failed];
        throw new SingularCircuitError(
          `design "${design.name}": ${label}`,
          `the DC equations have no unique solution (nothing fixes ${label} at DC)`,
          'Every node needs a DC path: a node reached only through capacitors floats at DC. Add a resistor to ground or across the capacitor.',
          { node: label.startsWith('node ') ? label.slice(5) : undefined },
        );
      }
      converged = iteration > 1;
      for (let i = 0; i < n; i++) {
        if (Math.abs(x[i] - previousX[i]) > RELTOL * Math.max(Math.abs(x[i]), Math.abs(previousX[i])) + VOLTAGE_ABSTOL_V) converged = false;
      }
      for (let k = 0; k < diodes.length; k++) {
        const { slot, vt, vcrit } = diodes[k];
        const wanted = voltage(slot.junction, inputV, x) - voltage(slot.cathode, inputV, x);
        const limited = limitJunctionVoltage(wanted, junctionV[k], vt, vcrit);
        if (Math.abs(limited - junctionV[k]) > RELTOL * Math.abs(limited) + VOLTAGE_ABSTOL_V) converged = false;
        junctionV[k] = limited;
      }
      previousX.set(x);
    }
    if (!converged) {
      throw new DcConvergenceError(
        `design "${design.name}": the DC solve did not converge at input ${inputV} V after ${MAX_ITERATIONS} iterations`,
        'Check diode models (IS, N, RS) for implausible values, or start the sweep at a smaller input level.',
      );
    }
    let outputV = voltage(layout.output, inputV, x);
    if (rails && (outputV < rails[0] || outputV > rails[1])) {
      outputV = Math.min(rails[1], Math.max(rails[0], outputV));
      result.clipped[level] = 1;
    }
    result.outputV[level] = outputV;
    result.iterations[level] = iteration;
  }
  return result;
}

function stampConductance(a: Float64Array, rhs: Float64Array, n: number, p: number, q: number, conductance: number, inputV: number): void {
  const add = (row: number, col: number, v: number) => {
    if (row < 0 || col === GROUND) return;
    if (col === INPUT) rhs[row] -= v * inputV;
    else a[row * n + col] += v;
  };
  add(p, p, conductance);
  add(p, q, -conductance);
  add(q, q, conductance);
  add(q, p, -conductance);
}

/**
 * SPICE's pnjlim: above the critical voltage a junction step is taken on a
 * logarithmic scale, so one Newton step cannot overshoot into exp overflow.
 */
export function limitJunctionVoltage(wantedV: number, previousV: number, vt: number, vcrit: number): number {
  if (wantedV > vcrit && Math.abs(wantedV - previousV) > 2 * vt) {
    if (previousV > 0) {
      const arg = 1 + (wantedV - previousV) / vt;
      return arg > 0 ? previousV + vt * Math.log(arg) : vcrit;
    }
    return vt * Math.log(wantedV / vt);
  }
  return wantedV;
}
