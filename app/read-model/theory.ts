/**
 * Theory for a build, shaped for the views and the analysis: curves with the
 * tolerance band over the measured frequencies, the theory's own figures, and
 * the GBW estimate. All of it comes from the theory engine (app/circuit)
 * applied to the build's actual part values.
 */
import { type Design, type OpAmpPart, solveAc, type AcResponse, monteCarloAc, TOLERANCE_BAND_SETTINGS, openLoopGainAt, outputOpAmpIndex } from '../circuit';
import type { TheoryColumns } from '../contract/contract';
import { minus3dbFrequenciesHz, passbandGainDb, type GbwEstimate, type TheoryAtPoints } from '../analysis';
import { fitSinglePoleOpAmp, FitError } from '../signal';
import { logGrid, radiansFromDegrees, ratioFromDb } from '../units';
import { ValidationError } from '../errors';

/** Theory curve for views: solveAc over the given frequencies (sorted), with the tolerance band. */
export function theoryColumns(design: Design, frequenciesHz: number[]): TheoryColumns {
  const sorted = Float64Array.from(new Set(frequenciesHz.filter((f) => f > 0 && Number.isFinite(f)))).sort();
  if (sorted.length === 0) return { frequencyHz: [], gainDb: [], phaseDeg: [], idealGainDb: [], idealPhaseDeg: [] };
  const response = solveAc(design, sorted);
  const band = monteCarloAc(design, sorted, TOLERANCE_BAND_SETTINGS);
  return {
    frequencyHz: Array.from(sorted),
    gainDb: Array.from(response.gainDb),
    phaseDeg: Array.from(response.phaseDeg),
    idealGainDb: Array.from(response.idealGainDb),
    idealPhaseDeg: Array.from(response.idealPhaseDeg),
    bandLowDb: Array.from(band.gainLowDb),
    bandHighDb: Array.from(band.gainHighDb),
  };
}

/** Figures of the theory itself on a dense grid over [fromHz, toHz], defined as the measured figures are. */
export function theoryFigures(design: Design, fromHz: number, toHz: number): { gainLimitHz: number | undefined; minus3dbHz: number[] } {
  const grid = logGrid(fromHz, toHz, 100);
  const response = solveAc(design, grid);
  const passband = passbandGainDb(grid, response.gainDb);
  const opamp = outputOpAmpIndex(design);
  return {
    gainLimitHz: opamp === undefined ? undefined : response.opamps[opamp]?.gainLimitHz,
    minus3dbHz: passband === undefined ? [] : minus3dbFrequenciesHz(grid, response.gainDb, passband),
  };
}

/**
 * Theory at the measured frequencies, in point order, for the analysis. The
 * tolerance band comes from `columns` when they cover every point (the band at a
 * frequency does not depend on the other frequencies solved with it: each Monte
 * Carlo sample draws its part values once), else from its own Monte Carlo run.
 */
export function theoryAtPoints(
  design: Design,
  stimulusHz: number[],
  figures: { gainLimitHz: number | undefined; minus3dbHz: number[] },
  columns?: TheoryColumns,
): TheoryAtPoints & { response: AcResponse } {
  const frequencies = Float64Array.from(stimulusHz);
  const response = solveAc(design, frequencies);
  const band = frequencies.length === 0 ? undefined : (columns && bandAt(columns, stimulusHz)) ?? monteCarloAc(design, frequencies, TOLERANCE_BAND_SETTINGS);
  return {
    response,
    gainDb: response.gainDb,
    idealGainDb: response.idealGainDb,
    idealPhaseDeg: response.idealPhaseDeg,
    bandLowDb: band?.gainLowDb,
    bandHighDb: band?.gainHighDb,
    gainLimitHz: figures.gainLimitHz,
    minus3dbHz: figures.minus3dbHz,
  };
}

/** The band of theory columns at the given frequencies, or undefined when one is not among them. */
function bandAt(columns: TheoryColumns, frequencyHz: number[]): { gainLowDb: Float64Array; gainHighDb: Float64Array } | undefined {
  if (!columns.bandLowDb || !columns.bandHighDb) return undefined;
  const indexOf = new Map(columns.frequencyHz.map((f, i) => [f, i]));
  const gainLowDb = new Float64Array(frequencyHz.length);
  const gainHighDb = new Float64Array(frequencyHz.length);
  for (let k = 0; k < frequencyHz.length; k++) {
    const i = indexOf.get(frequencyHz[k]);
    if (i === undefined) return undefined;
    gainLowDb[k] = columns.bandLowDb[i];
    gainHighDb[k] = columns.bandHighDb[i];
  }
  return { gainLowDb, gainHighDb };
}

/**
 * GBW from the single-pole fit (app/signal fitSinglePoleOpAmp). Its noise-gain
 * input is derived from the theory engine itself: with H = H_ideal/(1 + NG/A),
 * NG = A·(H_ideal/H − 1), exact for the model (DEVELOPERS.md "Theory"). Needs phase,
 * so scope runs only; undefined when the circuit has no op-amp or the fit fails.
 */
export function estimateGbw(
  design: Design,
  measured: { frequencyHz: number[]; gainDb: number[]; phaseDeg: number[]; gainUncertaintyDb: number[]; phaseUncertaintyDeg: number[] },
): GbwEstimate | undefined {
  const index = outputOpAmpIndex(design);
  if (index === undefined) return undefined;
  const model = (design.parts.filter((p) => p.type === 'opamp')[index] as OpAmpPart).model;
  if (model.ideal) return undefined;
  const keep = measured.frequencyHz.map((_, i) => i).filter((i) => [measured.gainDb[i], measured.phaseDeg[i], measured.gainUncertaintyDb[i], measured.phaseUncertaintyDeg[i]].every(Number.isFinite));
  if (keep.length < 3) return undefined;
  const frequencies = Float64Array.from(keep.map((i) => measured.frequencyHz[i]));
  const response = solveAc(design, frequencies);
  const count = frequencies.length;
  const idealRe = new Float64Array(count), idealIm = new Float64Array(count), ngRe = new Float64Array(count), ngIm = new Float64Array(count);
  const a = new Float64Array(2);
  for (let i = 0; i < count; i++) {
    const idealMag = ratioFromDb(response.idealGainDb[i]);
    const idealRad = radiansFromDegrees(response.idealPhaseDeg[i]);
    idealRe[i] = idealMag * Math.cos(idealRad);
    idealIm[i] = idealMag * Math.sin(idealRad);
    // q = H_ideal/H − 1, then NG = A·q.
    const hMagSq = response.re[i] ** 2 + response.im[i] ** 2;
    const qRe = (idealRe[i] * response.re[i] + idealIm[i] * response.im[i]) / hMagSq - 1;
    const qIm = (idealIm[i] * response.re[i] - idealRe[i] * response.im[i]) / hMagSq;
    openLoopGainAt(model, frequencies[i], a);
    ngRe[i] = a[0] * qRe - a[1] * qIm;
    ngIm[i] = a[0] * qIm + a[1] * qRe;
  }
  // Measured phases are wrapped; align each to the theory's continuous phase.
  const phaseDeg = keep.map((i, k) => measured.phaseDeg[i] + 360 * Math.round((response.phaseDeg[k] - measured.phaseDeg[i]) / 360));
  try {
    const fit = fitSinglePoleOpAmp({
      frequenciesHz: frequencies,
      measured: {
        gainDb: keep.map((i) => measured.gainDb[i]),
        phaseDeg,
        gainUncertaintyDb: keep.map((i) => Math.max(measured.gainUncertaintyDb[i], 1e-6)),
        phaseUncertaintyDeg: keep.map((i) => Math.max(measured.phaseUncertaintyDeg[i], 1e-6)),
      },
      idealResponse: { re: idealRe, im: idealIm },
      noiseGain: { re: ngRe, im: ngIm },
      initialGbwHz: model.gbw,
    });
    return { gbwHz: fit.gbwHz, gbwUncertaintyHz: fit.gbwStdHz };
  } catch (error) {
    if (error instanceof FitError || error instanceof ValidationError) return undefined;
    throw error;
  }
}
