/**
 * Output noise spectral density of a linear design, from the same MNA
 * equations as the AC response (see stamp.ts).
 *
 * Sources (all uncorrelated, one-sided densities):
 * - each resistor: thermal noise current 4kT/R A²/Hz across it (Johnson 1928,
 *   Nyquist 1928), T = the design's temperature, k exact (CODATA 2018);
 * - each op-amp: en in series with the non-inverting input and in into each
 *   input pin, each with a 1/f corner: e(f)² = e²·(1 + corner/f).
 * Capacitors, inductors and the ideal input source are noiseless; the output
 * resistance is taken as noiseless (its noise is part of en).
 *
 * Method: one adjoint solve per frequency (Aᵀ·y = e_out) gives the output's
 * transimpedance from every injection point at once; a source injecting the
 * vector b contributes |yᵀ·b|²·S to the output density. The same y times the
 * input source's vector is the gain, so the input-referred density costs nothing.
 */
import { AcSolver } from './ac-solver';
import { DesignError } from './design-error';
import { GROUND, INPUT } from './layout';
import { BOLTZMANN_J_PER_K, ZERO_CELSIUS_K } from './thermal-voltage';
import type { Design } from './types';

export type NoiseSourceKind = 'resistor' | 'opamp-voltage' | 'opamp-current-plus' | 'opamp-current-minus';

export interface NoiseSource {
  /** Column name stem: the part id, with `_en`, `_in_plus` or `_in_minus` for op-amp sources. */
  name: string;
  partId: string;
  kind: NoiseSourceKind;
}

export interface NoiseResponse {
  frequencyHz: Float64Array;
  /** Total output noise density, V/√Hz (root of the sum of the sources' squares). */
  outputVPerRtHz: Float64Array;
  /** Total ÷ |gain| from the input: the density at the input that would give the same output, V/√Hz. */
  inputReferredVPerRtHz: Float64Array;
  /** |Vout/Vin| with the op-amp model, V/V (the divisor of the input-referred density). */
  gainMagnitude: Float64Array;
  /** Only sources that can reach the output: resistors, and op-amp sources with a non-zero density on a non-fixed pin. */
  sources: NoiseSource[];
  /** Per source (same order as `sources`), its share of the output density, V/√Hz. */
  contributionsVPerRtHz: Float64Array[];
  temperatureK: number;
}

export interface NoiseOptions {
  /** Ideal op-amps (nullors): their en and in still count, shaped by the ideal circuit. */
  idealOpAmps?: boolean;
}

/** Where one source injects: `row` gets `scale` (a current into a node, or a voltage into an op-amp row). */
interface Injection {
  plusRow: number;
  minusRow: number;
  /** Output contribution = |scale·(y[plusRow] − y[minusRow])|·density. */
  scale: number;
  /** White density squared (A²/Hz or V²/Hz) and 1/f corner, Hz. */
  whiteSquared: number;
  cornerHz: number;
}

/** 4kT at the design's temperature, J (W/Hz). */
export function fourKTJ(temperatureC: number): number {
  return 4 * BOLTZMANN_J_PER_K * (temperatureC + ZERO_CELSIUS_K);
}

export function solveNoise(design: Design, frequenciesHz: ArrayLike<number>, options: NoiseOptions = {}): NoiseResponse {
  if (design.parts.some((p) => p.type === 'diode')) {
    throw new DesignError(
      `design "${design.name}"`,
      'noise analysis covers linear designs; a diode\'s noise depends on its operating point',
      'Compute the noise of the linear stages only, or measure the diode stage\'s noise on the bench.',
    );
  }
  const solver = new AcSolver(design);
  solver.stamp(options.idealOpAmps ? 'ideal' : 'model');
  const { sources, injections } = noiseSources(design, solver, options.idealOpAmps === true);
  const count = frequenciesHz.length;
  const size = solver.layout.size;
  const yRe = new Float64Array(size);
  const yIm = new Float64Array(size);
  const { bG, bC } = solver.pencil;
  const outputVPerRtHz = new Float64Array(count);
  const inputReferredVPerRtHz = new Float64Array(count);
  const gainMagnitude = new Float64Array(count);
  const contributions = sources.map(() => new Float64Array(count));
  const at = (row: number, y: Float64Array): number => (row < 0 ? 0 : y[row]);
  for (let i = 0; i < count; i++) {
    const frequencyHz = frequenciesHz[i];
    solver.outputAdjointAt(frequencyHz, yRe, yIm);
    const omega = 2 * Math.PI * frequencyHz;
    // gain = yᵀ·(bG + jω·bC), the input source's right-hand side per volt.
    let gainRe = 0;
    let gainIm = 0;
    for (let k = 0; k < size; k++) {
      gainRe += yRe[k] * bG[k] - yIm[k] * omega * bC[k];
      gainIm += yRe[k] * omega * bC[k] + yIm[k] * bG[k];
    }
    let totalSquared = 0;
    for (let s = 0; s < injections.length; s++) {
      const source = injections[s];
      const re = source.scale * (at(source.plusRow, yRe) - at(source.minusRow, yRe));
      const im = source.scale * (at(source.plusRow, yIm) - at(source.minusRow, yIm));
      const squared = (re * re + im * im) * source.whiteSquared * (1 + source.cornerHz / frequencyHz);
      contributions[s][i] = Math.sqrt(squared);
      totalSquared += squared;
    }
    outputVPerRtHz[i] = Math.sqrt(totalSquared);
    gainMagnitude[i] = Math.hypot(gainRe, gainIm);
    inputReferredVPerRtHz[i] = outputVPerRtHz[i] / gainMagnitude[i];
  }
  return {
    frequencyHz: Float64Array.from(frequenciesHz),
    outputVPerRtHz,
    inputReferredVPerRtHz,
    gainMagnitude,
    sources,
    contributionsVPerRtHz: contributions,
    temperatureK: design.temperatureC + ZERO_CELSIUS_K,
  };
}

function noiseSources(design: Design, solver: AcSolver, idealOpAmps: boolean): { sources: NoiseSource[]; injections: Injection[] } {
  const sources: NoiseSource[] = [];
  const injections: Injection[] = [];
  const { layout } = solver;
  const free = (row: number): boolean => row !== GROUND && row !== INPUT;
  const kT4 = fourKTJ(design.temperatureC);
  design.parts.forEach((part, p) => {
    if (part.type !== 'resistor') return;
    const [a, b] = layout.partNodes[p];
    // A resistor between two fixed nodes (input and ground) cannot reach the output.
    if (!free(a) && !free(b)) return;
    sources.push({ name: part.id, partId: part.id, kind: 'resistor' });
    injections.push({ plusRow: a, minusRow: b, scale: 1, whiteSquared: kT4 / part.value, cornerHz: 0 });
  });
  for (const slot of layout.opamps) {
    const m = slot.model;
    const en = m.voltageNoiseVPerRtHz ?? 0;
    if (en > 0) {
      // en adds to V+: nullor row "V+ − V− = 0" gets −en on its right; the
      // pole row "x1·(1+sτ) − A0·(V+ − V−) = 0" gets +A0·en.
      const nullor = idealOpAmps || m.ideal === true;
      sources.push({ name: `${slot.id}_en`, partId: slot.id, kind: 'opamp-voltage' });
      injections.push({
        plusRow: nullor ? slot.outputCurrent : slot.pole1,
        minusRow: GROUND,
        scale: nullor ? 1 : m.openLoopGain,
        whiteSquared: en * en,
        cornerHz: m.voltageNoiseCornerHz ?? 0,
      });
    }
    const inA = m.currentNoiseAPerRtHz ?? 0;
    if (inA > 0) {
      for (const [pin, row] of [['plus', slot.plus], ['minus', slot.minus]] as const) {
        if (!free(row)) continue;
        sources.push({ name: `${slot.id}_in_${pin}`, partId: slot.id, kind: pin === 'plus' ? 'opamp-current-plus' : 'opamp-current-minus' });
        injections.push({ plusRow: row, minusRow: GROUND, scale: 1, whiteSquared: inA * inA, cornerHz: m.currentNoiseCornerHz ?? 0 });
      }
    }
  }
  return { sources, injections };
}
