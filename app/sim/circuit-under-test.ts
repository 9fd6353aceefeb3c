/**
 * The circuit as the simulated generator sees it: the design with the
 * generator's source resistance in series with its input, so the theory
 * engine itself computes the loading of a 50 Ω source by the stage's input
 * impedance. Two views of it: the output node (scope ch2, meter) and the
 * design's input node (scope ch1).
 */
import { outputOpAmpIndex, slowestTimeConstantS, solveDcTransfer, transferFunction, withSourceResistance, type Design, type OpAmpModel } from '../circuit';

export interface Phasor {
  gain: number;
  phaseRad: number;
}

/** A τ beyond this is a GMIN artefact of a capacitor-only node, not a settling the bench would wait for. */
const MAX_SIMULATED_TIME_CONSTANT_S = 10;

export class CircuitUnderTest {
  readonly toOutput: Design;
  readonly toInput: Design;
  readonly timeConstantS: number;
  readonly rails: [number, number] | undefined;
  readonly slewRateVPerS: number | undefined;
  private readonly acCache = new Map<number, { output: Phasor; input: Phasor }>();
  private readonly dcCache = new Map<number, { outputV: number; inputV: number }>();
  /**
   * Each view's response, one frequency per call from a solver stamped once: a new generator frequency
   * costs two small solves, not a full AC analysis with its gain-limit search, in the simulated bench's
   * process while the generator's reply is under way.
   */
  private readonly transferToOutput: (frequencyHz: number) => { re: number; im: number };
  private readonly transferToInput: (frequencyHz: number) => { re: number; im: number };

  constructor(
    readonly design: Design,
    readonly sourceImpedanceOhm: number,
  ) {
    this.toOutput = withSourceResistance(design, sourceImpedanceOhm);
    this.toInput = { ...this.toOutput, output: design.input };
    this.timeConstantS = Math.min(MAX_SIMULATED_TIME_CONSTANT_S, slowestTimeConstantS(this.toOutput));
    const index = outputOpAmpIndex(design);
    const model = index === undefined ? undefined : (design.parts.filter((p) => p.type === 'opamp')[index] as { model: OpAmpModel }).model;
    this.rails = model?.rails;
    this.slewRateVPerS = model?.slewRate;
    this.transferToOutput = transferFunction(this.toOutput);
    this.transferToInput = transferFunction(this.toInput);
  }

  /** Output and input-node phasors per volt of generator EMF at `frequencyHz`. */
  ac(frequencyHz: number): { output: Phasor; input: Phasor } {
    const cached = this.acCache.get(frequencyHz);
    if (cached) return cached;
    const phasor = (transferAt: (frequencyHz: number) => { re: number; im: number }): Phasor => {
      const { re, im } = transferAt(frequencyHz);
      return { gain: Math.hypot(re, im), phaseRad: Math.atan2(im, re) };
    };
    const result = { output: phasor(this.transferToOutput), input: phasor(this.transferToInput) };
    if (this.acCache.size > 10_000) this.acCache.clear();
    this.acCache.set(frequencyHz, result);
    return result;
  }

  /** DC output and input-node volts for a DC EMF (nonlinear parts included). */
  dc(emfV: number): { outputV: number; inputV: number } {
    const cached = this.dcCache.get(emfV);
    if (cached) return cached;
    const inputs = Float64Array.of(emfV);
    const result = { outputV: solveDcTransfer(this.toOutput, inputs).outputV[0], inputV: solveDcTransfer(this.toInput, inputs).outputV[0] };
    if (this.dcCache.size > 10_000) this.dcCache.clear();
    this.dcCache.set(emfV, result);
    return result;
  }
}
