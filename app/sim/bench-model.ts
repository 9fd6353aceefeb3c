/**
 * The signals on the simulated bench as functions of bench time: what the
 * generator drives (EMF), what reaches the circuit input through the 50 Ω
 * source, and what the output does — linear response from the theory engine,
 * a settling transient after each change, slew limiting and clipping at the
 * output op-amp's rails, plus white noise.
 *
 * Model (an approximation, stated so nobody mistakes it for a transient solver):
 * - steady state per generator setting: DC part from the DC transfer, AC part
 *   from the AC phasor; with slew limiting, one period of the slew-limited
 *   steady state is precomputed as a table (the output cannot change faster
 *   than SR, so a sine above SR/(2π·Vp) turns into a triangle-like wave);
 * - after a change at t_c the output moves from the old steady state to the
 *   new one as y = new + (old − new)·e^(−(t − t_c)/τ), τ the circuit's
 *   slowest time constant;
 * - then clipping at the rails and additive Gaussian noise: flat (noiseVrms,
 *   on every node: the measurement's own noise) and, when asked for, the
 *   circuit's own noise at the output, shaped by the circuit (circuit-noise.ts).
 */
import { SeededRandom } from '../numeric';
import type { BenchClock } from '../bench/clock';
import { CircuitNoise, METER_NOISE_INTERVAL_S } from './circuit-noise';
import { CircuitUnderTest, type Phasor } from './circuit-under-test';

export interface GeneratorOutput {
  on: boolean;
  shape: 'sine' | 'dc';
  frequencyHz: number;
  /** Open-circuit (EMF) peak volts of the sine. */
  emfAmplitudeVpk: number;
  /** Open-circuit DC offset (or DC level), volts. */
  emfOffsetV: number;
}

interface SteadyState {
  output: GeneratorOutput;
  outputDcV: number;
  inputDcV: number;
  outputPhasor: Phasor;
  inputPhasor: Phasor;
  /** One period of the slew-limited output AC part, or undefined when the slope stays under the slew rate. */
  slewTable: Float64Array | undefined;
}

const SLEW_TABLE_POINTS = 1024;

export type BenchNode = 'input' | 'output';

export class BenchModel {
  private settled: SteadyState;
  private previous: SteadyState;
  /** A setting taken but whose steady state is not computed yet (see setGenerator). */
  private pendingOutput: GeneratorOutput | undefined;
  private changedAtS = -Infinity;
  private readonly random: SeededRandom;
  /** The circuit's own output noise, when the bench adds it (undefined: none). */
  readonly circuitNoise: CircuitNoise | undefined;

  constructor(
    readonly circuit: CircuitUnderTest,
    private readonly clock: BenchClock,
    private noiseVrms: number,
    seed: number,
    withCircuitNoise = false,
  ) {
    this.random = new SeededRandom(seed);
    // Its own random stream, so the flat noise's sequence does not depend on whether circuit noise is on.
    this.circuitNoise = withCircuitNoise ? new CircuitNoise(circuit.toOutput, new SeededRandom(seed ^ 0xc1c0)) : undefined;
    this.settled = this.steadyState({ on: false, shape: 'sine', frequencyHz: 1000, emfAmplitudeVpk: 0, emfOffsetV: 0 });
    this.previous = this.settled;
  }

  get generatorOutput(): GeneratorOutput {
    return this.pendingOutput ?? this.settled.output;
  }

  /** The steady state of the present setting, computed now if the setting is new. */
  private current(): SteadyState {
    if (this.pendingOutput) {
      this.settled = this.steadyState(this.pendingOutput);
      this.pendingOutput = undefined;
    }
    return this.settled;
  }

  setNoise(noiseVrms: number): void {
    this.noiseVrms = noiseVrms;
  }

  /**
   * The generator changed: start a settling transient from the present state.
   * The new steady state (AC solves, slew table) is computed on the next turn
   * of the event loop or when first sampled, whichever comes first, so the
   * instrument's reply is not held up by it; the change itself is dated now.
   * Several settings of one program message are one change from the state
   * before the message.
   */
  setGenerator(output: GeneratorOutput): void {
    if (!this.pendingOutput) {
      this.previous = this.current();
      setImmediate(() => this.current());
    }
    this.pendingOutput = output;
    this.changedAtS = this.clock.nowS();
  }

  /** `count` samples of a node from `startS` at `intervalS`, with noise. */
  sample(node: BenchNode, startS: number, intervalS: number, count: number): Float64Array {
    const out = new Float64Array(count);
    for (let i = 0; i < count; i++) out[i] = this.valueAt(node, startS + i * intervalS) + this.noiseVrms * this.random.nextGaussian();
    if (node === 'output' && this.circuitNoise) {
      const noise = this.circuitNoise.samples(startS, intervalS, count);
      for (let i = 0; i < count; i++) out[i] += noise[i];
    }
    return out;
  }

  /**
   * Stratified random samples over [startS, startS + durationS]: one sample
   * at a random time in each of `count` equal slices. Unbiased for the RMS of
   * any waveform, with no aliasing against the signal frequency (a meter's
   * integrating converter has none either).
   */
  sampleStratified(node: BenchNode, startS: number, durationS: number, count: number): Float64Array {
    const out = new Float64Array(count);
    const slice = durationS / count;
    const circuitNoise = node === 'output' ? this.circuitNoise : undefined;
    for (let i = 0; i < count; i++) {
      const timeS = startS + (i + this.random.nextUniform()) * slice;
      out[i] = this.valueAt(node, timeS) + this.noiseVrms * this.random.nextGaussian() + (circuitNoise ? circuitNoise.at(timeS, METER_NOISE_INTERVAL_S) : 0);
    }
    return out;
  }

  /** Noise-free value of a node at bench time `timeS`. */
  valueAt(node: BenchNode, timeS: number): number {
    const now = this.steadyValue(this.current(), node, timeS);
    // Only the output settles and clips; the input node follows the generator at once.
    if (node === 'input') return now;
    let value = now;
    if (timeS <= this.changedAtS) {
      value = this.steadyValue(this.previous, node, timeS);
    } else {
      const decay = Math.exp(-(timeS - this.changedAtS) / this.circuit.timeConstantS);
      if (decay > 1e-12) value = now + (this.steadyValue(this.previous, node, timeS) - now) * decay;
    }
    if (this.circuit.rails) value = Math.min(this.circuit.rails[1], Math.max(this.circuit.rails[0], value));
    return value;
  }

  private steadyValue(state: SteadyState, node: BenchNode, timeS: number): number {
    const output = state.output;
    const dcV = node === 'output' ? state.outputDcV : state.inputDcV;
    if (!output.on || output.shape === 'dc' || output.emfAmplitudeVpk === 0) return dcV;
    const cycles = output.frequencyHz * timeS;
    if (node === 'output' && state.slewTable) {
      const position = (cycles - Math.floor(cycles)) * SLEW_TABLE_POINTS;
      const index = Math.floor(position);
      const fraction = position - index;
      const table = state.slewTable;
      return dcV + table[index] + (table[(index + 1) % SLEW_TABLE_POINTS] - table[index]) * fraction;
    }
    const phasor = node === 'output' ? state.outputPhasor : state.inputPhasor;
    return dcV + phasor.gain * output.emfAmplitudeVpk * Math.sin(2 * Math.PI * cycles + phasor.phaseRad);
  }

  private steadyState(output: GeneratorOutput): SteadyState {
    const emfDcV = output.on ? output.emfOffsetV : 0;
    const dc = this.circuit.dc(emfDcV);
    const sine = output.on && output.shape === 'sine' && output.emfAmplitudeVpk > 0;
    const ac = sine ? this.circuit.ac(output.frequencyHz) : { output: { gain: 0, phaseRad: 0 }, input: { gain: 0, phaseRad: 0 } };
    const state: SteadyState = { output, outputDcV: dc.outputV, inputDcV: dc.inputV, outputPhasor: ac.output, inputPhasor: ac.input, slewTable: undefined };
    const slewRate = this.circuit.slewRateVPerS;
    if (sine && slewRate !== undefined) {
      const peakV = ac.output.gain * output.emfAmplitudeVpk;
      if (2 * Math.PI * output.frequencyHz * peakV > slewRate) state.slewTable = slewLimitedPeriod(peakV, ac.output.phaseRad, output.frequencyHz, slewRate);
    }
    return state;
  }
}

/**
 * One period (SLEW_TABLE_POINTS samples over phase 0…1) of a sine of peak
 * `peakV` followed by an output that can move at most `slewRate` V/s. Runs a
 * few periods so the start-up is gone, then keeps the last.
 */
function slewLimitedPeriod(peakV: number, phaseRad: number, frequencyHz: number, slewRate: number): Float64Array {
  const stepS = 1 / (frequencyHz * SLEW_TABLE_POINTS);
  const maxStepV = slewRate * stepS;
  const table = new Float64Array(SLEW_TABLE_POINTS);
  let y = 0;
  const warmupPeriods = 16; // the start-up offset dies out within ~8 periods
  for (let period = 0; period <= warmupPeriods; period++) {
    for (let i = 0; i < SLEW_TABLE_POINTS; i++) {
      const target = peakV * Math.sin((2 * Math.PI * i) / SLEW_TABLE_POINTS + phaseRad);
      y += Math.max(-maxStepV, Math.min(maxStepV, target - y));
      if (period === warmupPeriods) table[i] = y;
    }
  }
  // Remove what is left of the start-up offset: a symmetric-slewing op-amp's AC part has zero mean.
  let meanV = 0;
  for (const v of table) meanV += v / SLEW_TABLE_POINTS;
  for (let i = 0; i < SLEW_TABLE_POINTS; i++) table[i] -= meanV;
  return table;
}
