/**
 * Stability of each op-amp's loop: loop gain T = A·β (A the open-loop gain,
 * β the feedback fraction from the MNA solve, with the rest of the circuit —
 * output resistance, capacitive load, other op-amps — in place), its
 * crossover, phase margin, gain margin and the closed-loop peaking
 * max |T/(1 + T)| (the peaking the loop adds on top of the design's own shape).
 *
 * Definitions (Bode's; e.g. Ogata, Modern Control Engineering, ch. 7):
 * phase margin = 180° + ∠T at |T| = 1; gain margin = −20·log10|T| where ∠T
 * first reaches −180°. Phase is unwrapped from the lowest scan frequency,
 * where negative feedback gives ∠T ≈ 0°.
 */
import { dbFromRatio, degreesFromRadians, formatFixed, unwrapPhaseDeg } from '../units';
import { AcSolver } from './ac-solver';
import { bisectLogF } from './bisect-log-f';
import { openLoopGainAt } from './opamp-gain';
import type { OpAmpSlot } from './layout';
import type { Design } from './types';

/** Below this phase margin a design is flagged (common practice, no source: 45° keeps peaking near 2.5 dB or less). */
export const DEFAULT_MIN_PHASE_MARGIN_DEG = 45;

export interface LoopGainColumns {
  id: string;
  /** |T| in dB. */
  loopGainDb: Float64Array;
  /** ∠T, continuous from the first point, degrees. */
  loopPhaseDeg: Float64Array;
}

export interface OpAmpStability {
  id: string;
  /** Where |T| falls through 1 (first time); undefined when it never does (ideal op-amp, or |T| < 1 throughout). */
  crossoverHz: number | undefined;
  /** 180° + ∠T at the crossover, degrees; undefined without a crossover. */
  phaseMarginDeg: number | undefined;
  /** Where ∠T first reaches −180°; undefined when it never does (then the gain margin is infinite). */
  phaseCrossoverHz: number | undefined;
  /** −|T| in dB at the phase crossover; Infinity when ∠T never reaches −180°. */
  gainMarginDb: number;
  /** max |T/(1+T)| in dB, at least 0 (no peaking). */
  peakingDb: number;
  /** Where that maximum lies; undefined when there is no peaking. */
  peakingHz: number | undefined;
}

export interface LowPhaseMarginWarning {
  kind: 'low-phase-margin';
  opAmpId: string;
  phaseMarginDeg: number;
  limitDeg: number;
  /** Plain text for the CLI, the Design view and the record. */
  message: string;
}

export type TheoryWarning = LowPhaseMarginWarning;

/** Loop gain of every non-ideal op-amp on the given grid. */
export function loopGainColumns(design: Design, frequenciesHz: ArrayLike<number>): LoopGainColumns[] {
  const solver = new AcSolver(design);
  solver.stamp('model');
  const t = new Float64Array(2);
  const columns: LoopGainColumns[] = [];
  solver.layout.opamps.forEach((slot, index) => {
    if (slot.model.ideal === true) return;
    const count = frequenciesHz.length;
    const loopGainDb = new Float64Array(count);
    const loopPhaseDeg = new Float64Array(count);
    for (let i = 0; i < count; i++) {
      loopGainAt(solver, index, slot, frequenciesHz[i], t);
      loopGainDb[i] = dbFromRatio(Math.hypot(t[0], t[1]));
      loopPhaseDeg[i] = degreesFromRadians(Math.atan2(t[1], t[0]));
    }
    columns.push({ id: slot.id, loopGainDb, loopPhaseDeg: unwrapPhaseDeg(loopPhaseDeg) });
  });
  return columns;
}

const SCAN_FROM_HZ = 1e-3;
/** Dense enough that ∠T moves far less than 180° between scan points, even across a sharp resonance. */
const SCAN_POINTS_PER_DECADE = 50;
const BISECTION_STEPS = 60;
const GOLDEN_STEPS = 80;

/** Stability figures of every non-ideal op-amp, independent of any sweep grid. */
export function analyzeStability(design: Design): OpAmpStability[] {
  const solver = new AcSolver(design);
  solver.stamp('model');
  const results: OpAmpStability[] = [];
  solver.layout.opamps.forEach((slot, index) => {
    if (slot.model.ideal === true) return;
    results.push(opAmpStability(solver, index, slot));
  });
  return results;
}

function opAmpStability(solver: AcSolver, index: number, slot: OpAmpSlot): OpAmpStability {
  const t = new Float64Array(2);
  const scanToHz = slot.model.gbw * 1e3;
  const steps = Math.ceil(Math.log10(scanToHz / SCAN_FROM_HZ) * SCAN_POINTS_PER_DECADE);
  const frequencyHz = new Float64Array(steps + 1);
  const magnitude = new Float64Array(steps + 1);
  const phaseDeg = new Float64Array(steps + 1);
  const closedLoop = new Float64Array(steps + 1);
  for (let i = 0; i <= steps; i++) {
    frequencyHz[i] = SCAN_FROM_HZ * (scanToHz / SCAN_FROM_HZ) ** (i / steps);
    loopGainAt(solver, index, slot, frequencyHz[i], t);
    magnitude[i] = Math.hypot(t[0], t[1]);
    phaseDeg[i] = degreesFromRadians(Math.atan2(t[1], t[0]));
    closedLoop[i] = closedLoopMagnitude(t);
  }
  unwrapPhaseDeg(phaseDeg);

  /** ∠T at f, on the branch of the scan point `near`. */
  const phaseAt = (f: number, near: number): number => {
    loopGainAt(solver, index, slot, f, t);
    const wrapped = degreesFromRadians(Math.atan2(t[1], t[0]));
    return wrapped + 360 * Math.round((phaseDeg[near] - wrapped) / 360);
  };

  let crossoverHz: number | undefined;
  let phaseMarginDeg: number | undefined;
  for (let i = 1; i <= steps; i++) {
    if (magnitude[i - 1] > 1 && magnitude[i] <= 1) {
      crossoverHz = bisectLogF(frequencyHz[i - 1], frequencyHz[i], BISECTION_STEPS, (f) => {
        loopGainAt(solver, index, slot, f, t);
        return Math.hypot(t[0], t[1]) > 1;
      });
      phaseMarginDeg = 180 + phaseAt(crossoverHz, i);
      break;
    }
  }

  let phaseCrossoverHz: number | undefined;
  let gainMarginDb = Infinity;
  for (let i = 1; i <= steps; i++) {
    if (phaseDeg[i - 1] > -180 && phaseDeg[i] <= -180) {
      phaseCrossoverHz = bisectLogF(frequencyHz[i - 1], frequencyHz[i], BISECTION_STEPS, (f) => phaseAt(f, i) > -180);
      loopGainAt(solver, index, slot, phaseCrossoverHz, t);
      gainMarginDb = -dbFromRatio(Math.hypot(t[0], t[1]));
      break;
    }
  }

  let peak = 0;
  for (let i = 1; i <= steps; i++) if (closedLoop[i] > closedLoop[peak]) peak = i;
  let peakingDb = 0;
  let peakingHz: number | undefined;
  if (peak > 0 && peak < steps && closedLoop[peak] > 1) {
    peakingHz = goldenMaxLogF(frequencyHz[peak - 1], frequencyHz[peak + 1], (f) => {
      loopGainAt(solver, index, slot, f, t);
      return closedLoopMagnitude(t);
    });
    loopGainAt(solver, index, slot, peakingHz, t);
    peakingDb = dbFromRatio(closedLoopMagnitude(t));
  }
  return { id: slot.id, crossoverHz, phaseMarginDeg, phaseCrossoverHz, gainMarginDb, peakingDb, peakingHz };
}

/** The warnings a stability result raises: phase margin below `minPhaseMarginDeg`. */
export function stabilityWarnings(stability: OpAmpStability[], minPhaseMarginDeg = DEFAULT_MIN_PHASE_MARGIN_DEG): TheoryWarning[] {
  const warnings: TheoryWarning[] = [];
  for (const s of stability) {
    if (s.phaseMarginDeg === undefined || s.phaseMarginDeg >= minPhaseMarginDeg) continue;
    const pm = formatFixed(s.phaseMarginDeg, 1);
    const what =
      s.phaseMarginDeg <= 0
        ? 'the loop has no phase margin left: the stage will oscillate'
        : `the stage will ring and its response peaks by ${formatFixed(s.peakingDb, 1)} dB; a little more load capacitance may make it oscillate`;
    warnings.push({
      kind: 'low-phase-margin',
      opAmpId: s.id,
      phaseMarginDeg: s.phaseMarginDeg,
      limitDeg: minPhaseMarginDeg,
      message: `${s.id}: phase margin ${pm}° is below ${minPhaseMarginDeg}° — ${what}. Raise the noise gain near the crossover (e.g. a small capacitor across the feedback resistor), isolate a capacitive load with a series resistor, or use a slower op-amp.`,
    });
  }
  return warnings;
}

const beta = new Float64Array(2);

function loopGainAt(solver: AcSolver, index: number, slot: OpAmpSlot, frequencyHz: number, out: Float64Array): void {
  solver.feedbackFractionAt(index, frequencyHz, beta);
  openLoopGainAt(slot.model, frequencyHz, out);
  const re = out[0] * beta[0] - out[1] * beta[1];
  const im = out[0] * beta[1] + out[1] * beta[0];
  out[0] = re;
  out[1] = im;
}

/** |T/(1 + T)| for T in t[0] + j·t[1]. */
function closedLoopMagnitude(t: Float64Array): number {
  return Math.hypot(t[0], t[1]) / Math.hypot(1 + t[0], t[1]);
}

/** Golden-section search for the maximum of a unimodal function of log f in [lowHz, highHz]. */
function goldenMaxLogF(lowHz: number, highHz: number, value: (frequencyHz: number) => number): number {
  const ratio = (Math.sqrt(5) - 1) / 2;
  let a = Math.log(lowHz);
  let b = Math.log(highHz);
  let c = b - ratio * (b - a);
  let d = a + ratio * (b - a);
  let fc = value(Math.exp(c));
  let fd = value(Math.exp(d));
  for (let k = 0; k < GOLDEN_STEPS; k++) {
    if (fc > fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - ratio * (b - a);
      fc = value(Math.exp(c));
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + ratio * (b - a);
      fd = value(Math.exp(d));
    }
  }
  return Math.exp((a + b) / 2);
}
