/**
 * Gain and phase of a stage from simultaneous fits of its input and output
 * records. Uncertainties combine both fits in quadrature (GUM, JCGM 100:2008
 * §5.1.2), treating the two channels' noise as uncorrelated.
 */
import { ValidationError } from '../errors';
import { dbFromRatio, degreesFromRadians, wrapPhaseDeg } from '../units';
import { FitError } from './errors';
import { sineFit3, type SineFit, type SineRecord } from './sine-fit';

export interface StageResponse {
  frequencyHz: number;
  gainRatio: number;
  gainRatioStd: number;
  gainDb: number;
  gainStdDb: number;
  /** Output phase minus input phase, wrapped to (−180°, 180°]. */
  phaseDeg: number;
  phaseStdDeg: number;
  input: SineFit;
  output: SineFit;
}

/** 20/ln 10: d(20·log10 G)/dG · G. */
const DB_PER_RELATIVE_UNIT = 20 / Math.LN10;

export function responseFromFits(input: SineFit, output: SineFit): StageResponse {
  if (input.frequencyHz !== output.frequencyHz) {
    throw new ValidationError('output.frequencyHz', `input was fitted at ${input.frequencyHz} Hz but output at ${output.frequencyHz} Hz`);
  }
  if (!(input.amplitudeV > 0)) {
    throw new FitError('input channel', 'shows no sine at the stimulus frequency', 'Check the input probe and the generator output.');
  }
  const gainRatio = output.amplitudeV / input.amplitudeV;
  const relativeInput = input.amplitudeStdV / input.amplitudeV;
  const relativeOutput = output.amplitudeV > 0 ? output.amplitudeStdV / output.amplitudeV : Number.POSITIVE_INFINITY;
  const relativeGain = Math.hypot(relativeInput, relativeOutput);
  const phaseStdRad = Math.hypot(input.phaseStdRad, output.phaseStdRad);
  return {
    frequencyHz: input.frequencyHz,
    gainRatio,
    gainRatioStd: gainRatio * relativeGain,
    gainDb: dbFromRatio(gainRatio),
    gainStdDb: DB_PER_RELATIVE_UNIT * relativeGain,
    phaseDeg: wrapPhaseDeg(degreesFromRadians(output.phaseRad - input.phaseRad)),
    phaseStdDeg: degreesFromRadians(phaseStdRad),
    input,
    output,
  };
}

/** Fits both records at the stimulus frequency and returns the stage's gain and phase. */
export function twoChannelResponse(input: SineRecord, output: SineRecord, frequencyHz: number): StageResponse {
  return responseFromFits(sineFit3({ ...input, frequencyHz }), sineFit3({ ...output, frequencyHz }));
}
