/**
 * Fills the real MNA pencil G + s·C and the source vectors (per volt of
 * input) for the linear parts. Dense row-major n×n arrays: circuits here have
 * a handful of nodes, where dense elimination beats sparse bookkeeping.
 *
 * Right-hand side for an input of Vin volts: b = (bG + s·bC)·Vin.
 */
import type { CircuitLayout } from './layout';
import { GROUND, INPUT } from './layout';
import { thermalVoltageV } from './thermal-voltage';
import type { Design } from './types';

/** SPICE's default GMIN across every junction, siemens. */
export const JUNCTION_GMIN_S = 1e-12;

export interface Pencil {
  size: number;
  g: Float64Array;
  c: Float64Array;
  bG: Float64Array;
  bC: Float64Array;
}

export function allocatePencil(size: number): Pencil {
  return {
    size,
    g: new Float64Array(size * size),
    c: new Float64Array(size * size),
    bG: new Float64Array(size),
    bC: new Float64Array(size),
  };
}

/** How op-amps enter the equations. */
export type OpAmpMode = 'model' | 'ideal';

/**
 * Stamps every linear part. `values[i]` overrides part i's value (Monte Carlo
 * and measured builds). Diodes enter as their small-signal model at zero bias
 * (IS/(n·VT) + GMIN, with RS in series), which is what an AC analysis sees
 * around a 0 V operating point; the DC solver passes `withDiodes = false` and
 * stamps its own Newton companion models instead.
 */
export function stampLinear(design: Design, layout: CircuitLayout, values: Float64Array, mode: OpAmpMode, pencil: Pencil, withDiodes = true): void {
  const n = pencil.size;
  const { g, c, bG, bC } = pencil;
  g.fill(0);
  c.fill(0);
  bG.fill(0);
  bC.fill(0);
  const addG = (row: number, col: number, v: number): void => {
    if (row < 0 || col === GROUND) return;
    if (col === INPUT) bG[row] -= v;
    else g[row * n + col] += v;
  };
  const addC = (row: number, col: number, v: number): void => {
    if (row < 0 || col === GROUND) return;
    if (col === INPUT) bC[row] -= v;
    else c[row * n + col] += v;
  };
  const parts = design.parts;
  for (let p = 0; p < parts.length; p++) {
    const part = parts[p];
    const nodes = layout.partNodes[p];
    const a = nodes[0];
    const b = nodes[1];
    switch (part.type) {
      case 'resistor': {
        const conductance = 1 / values[p];
        addG(a, a, conductance);
        addG(a, b, -conductance);
        addG(b, b, conductance);
        addG(b, a, -conductance);
        break;
      }
      case 'capacitor': {
        const capacitance = values[p];
        addC(a, a, capacitance);
        addC(a, b, -capacitance);
        addC(b, b, capacitance);
        addC(b, a, -capacitance);
        break;
      }
      case 'inductor': {
        // Branch current k flows a → b; branch equation Va − Vb − s·L·I = 0.
        const k = layout.partBranch[p];
        addG(a, k, 1);
        addG(b, k, -1);
        addG(k, a, 1);
        addG(k, b, -1);
        addC(k, k, -values[p]);
        break;
      }
      case 'diode': {
        if (!withDiodes) break;
        const slot = layout.diodes.find((d) => d.partIndex === p)!;
        const junctionS = part.model.is / (part.model.n * thermalVoltageV(design.temperatureC)) + JUNCTION_GMIN_S;
        addG(slot.junction, slot.junction, junctionS);
        addG(slot.junction, slot.cathode, -junctionS);
        addG(slot.cathode, slot.cathode, junctionS);
        addG(slot.cathode, slot.junction, -junctionS);
        if (slot.junction !== slot.anode) {
          const seriesS = 1 / part.model.rs;
          addG(slot.anode, slot.anode, seriesS);
          addG(slot.anode, slot.junction, -seriesS);
          addG(slot.junction, slot.junction, seriesS);
          addG(slot.junction, slot.anode, -seriesS);
        }
        break;
      }
      default:
        break;
    }
  }
  for (const slot of layout.opamps) {
    // Output current enters the output node (KCL rows sum currents leaving).
    addG(slot.out, slot.outputCurrent, -1);
    const ideal = mode === 'ideal' || slot.model.ideal === true;
    if (ideal) {
      // Nullor: the inputs sit at the same voltage, the output supplies what is needed.
      addG(slot.outputCurrent, slot.plus, 1);
      addG(slot.outputCurrent, slot.minus, -1);
      addG(slot.pole1, slot.pole1, 1);
      if (slot.pole2 >= 0) addG(slot.pole2, slot.pole2, 1);
      continue;
    }
    // Single-pole macro-model: x1·(1 + s·A0/(2π·GBW)) = A0·(V+ − V−); optional
    // second pole x2·(1 + s/(2π·f2)) = x1; the last pole state drives the
    // output pin through the output resistance.
    const a0 = slot.model.openLoopGain;
    addG(slot.pole1, slot.pole1, 1);
    addG(slot.pole1, slot.plus, -a0);
    addG(slot.pole1, slot.minus, a0);
    addC(slot.pole1, slot.pole1, a0 / (2 * Math.PI * slot.model.gbw));
    let last = slot.pole1;
    if (slot.pole2 >= 0) {
      addG(slot.pole2, slot.pole2, 1);
      addG(slot.pole2, slot.pole1, -1);
      addC(slot.pole2, slot.pole2, 1 / (2 * Math.PI * (slot.model.secondPoleHz as number)));
      last = slot.pole2;
    }
    // Output pin = pole state − Ro·I (Ro inside the loop; absent means 0 Ω).
    addG(slot.outputCurrent, slot.out, 1);
    addG(slot.outputCurrent, last, -1);
    addG(slot.outputCurrent, slot.outputCurrent, slot.model.outputResistanceOhm ?? 0);
  }
}

/** The nominal value of each part (0 for parts without a value). */
export function nominalValues(design: Design): Float64Array {
  const values = new Float64Array(design.parts.length);
  design.parts.forEach((part, i) => {
    if ('value' in part) values[i] = part.value;
  });
  return values;
}
