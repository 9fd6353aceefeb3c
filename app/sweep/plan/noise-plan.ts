/**
 * The plan of a noise run: how the records are taken, fixed before the first
 * one so a resumed run goes on exactly alike. A request that cannot give the
 * band it asks for is refused here, naming the field and what would work.
 *
 * Scope: the sample rate is 2.56 × the band's top, the span convention of FFT
 * analysers (the band then ends well inside Nyquist, where a real scope's
 * anti-alias roll-off has not begun; common practice, no source). The Welch
 * resolution is that rate ÷ the segment length N, and the band must start at
 * least LOWEST_BIN bins up: the lowest bins of a windowed, mean-removed
 * segment hold the window's leakage of what lies below the resolution
 * (common practice, no source). A record holds four segments' worth of
 * samples (seven 50 %-overlapped segments), up to RECORD_POINTS_LIMIT.
 *
 * Meter: each record is one AC RMS reading over the meter's aperture.
 */
import { ValidationError } from '../../errors';
import type { NoiseAcquisition, NoisePlanSummary, NoiseRequest, PlannedStep } from '../../contract/contract';
import { formatEngineering } from '../../units';
import { settleTimeS } from './settle';

export const NOISE_SPAN_FACTOR = 2.56;
export const LOWEST_BIN = 4;
/** A record length most digitizers offer (common practice, no source). */
export const RECORD_POINTS_LIMIT = 65_536;
const SEGMENTS_PER_RECORD = 4;
const WELCH_OVERLAP = 0.5;
/** The scope's range holds ±6σ of Gaussian noise: exceeded by 2·10⁻⁹ of the samples (erfc(6/√2), the normal distribution). */
export const NOISE_CREST_FACTOR = 6;

/** What the noise plan needs of the circuit (the build with its input held by the generator's source resistance), supplied by the caller. */
export interface NoisePlanTheory {
  slowestTimeConstantS: number;
  /** The output's DC level with the input at rest, volts. */
  outputDcV: number;
  /** RMS output noise over a band, volts. */
  rmsNoiseV(fromHz: number, toHz: number): number;
}

export interface NoisePlanInput {
  request: NoiseRequest;
  theory: NoisePlanTheory;
  /** The generator's source resistance (profile), ohms: what the input sees with the output off. */
  sourceImpedanceOhm: number;
  /** Time an instrument needs after a setting change (s), and the meter's aperture per reading (s). */
  instrumentSettleS: number;
  meterApertureS: number;
}

export function planNoise(input: NoisePlanInput): NoisePlanSummary {
  const { request, theory } = input;
  const settleS = settleTimeS(theory.slowestTimeConstantS, input.instrumentSettleS);
  const acquisition = request.measurement === 'scope' ? scopeAcquisition(input, settleS) : meterAcquisition(input, settleS);
  const steps: PlannedStep[] = Array.from({ length: request.records }, (_, index) => ({
    index,
    stimulus: 0,
    amplitudeVpp: 0,
    settleS: index === 0 ? settleS : 0,
    integrateS: acquisition.recordS,
  }));
  const warnings =
    request.measurement === 'meter'
      ? [`a meter reads the RMS over its own bandwidth: the reading is compared with the noise computed from ${formatEngineering(request.fromHz, 'Hz')} to ${formatEngineering(request.toHz, 'Hz')}, so give the meter's noise bandwidth as the band`]
      : [];
  return { steps, estimatedDurationS: settleS + request.records * acquisition.recordS, warnings, acquisition };
}

function scopeAcquisition(input: NoisePlanInput, settleS: number): NoiseAcquisition {
  const { request, theory } = input;
  const n = request.segmentLength;
  const sampleRateHz = NOISE_SPAN_FACTOR * request.toHz;
  const resolutionHz = sampleRateHz / n;
  if (request.fromHz < LOWEST_BIN * resolutionHz) {
    const neededN = 2 ** Math.ceil(Math.log2((LOWEST_BIN * sampleRateHz) / request.fromHz));
    const fix = neededN <= RECORD_POINTS_LIMIT
      ? `Use a segment length of at least ${neededN}, or start the band at ${formatEngineering(LOWEST_BIN * resolutionHz, 'Hz')} or above.`
      : `No segment up to ${RECORD_POINTS_LIMIT} samples resolves this band in one run: measure it as two runs (a low and a high band).`;
    throw new ValidationError(
      'segmentLength',
      `${n} samples at the ${formatEngineering(sampleRateHz, 'Hz')} sample rate the band's top needs resolve ${formatEngineering(resolutionHz, 'Hz')}; the band's start ${formatEngineering(request.fromHz, 'Hz')} is below ${LOWEST_BIN} bins of that`,
      fix,
    );
  }
  const recordPoints = Math.min(RECORD_POINTS_LIMIT, Math.max(n, SEGMENTS_PER_RECORD * n));
  const expectedRmsV = theory.rmsNoiseV(resolutionHz, sampleRateHz / 2);
  const expectedDcV = theory.outputDcV;
  return {
    measurement: 'scope',
    sampleRateHz,
    recordPoints,
    recordS: recordPoints / sampleRateHz,
    segmentLength: n,
    window: request.window,
    overlap: WELCH_OVERLAP,
    expectedRmsV,
    expectedDcV,
    rangeV: Math.abs(expectedDcV) + NOISE_CREST_FACTOR * expectedRmsV,
    settleS,
    sourceImpedanceOhm: input.sourceImpedanceOhm,
  };
}

function meterAcquisition(input: NoisePlanInput, settleS: number): NoiseAcquisition {
  const { request, theory } = input;
  return {
    measurement: 'meter',
    sampleRateHz: 0,
    recordPoints: 0,
    recordS: input.meterApertureS,
    segmentLength: request.segmentLength,
    window: request.window,
    overlap: WELCH_OVERLAP,
    expectedRmsV: theory.rmsNoiseV(request.fromHz, request.toHz),
    expectedDcV: theory.outputDcV,
    rangeV: 0,
    settleS,
    sourceImpedanceOhm: input.sourceImpedanceOhm,
  };
}
