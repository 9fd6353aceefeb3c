/**
 * Several acquisitions of one step reduced to one point, outliers rejected. Phases are averaged
 * as deviations from the first acquisition so a jump across ±180° cannot
 * cancel out.
 */
import { averageWithOutlierRejection, type StageResponse } from '../../signal';
import { wrapPhaseDeg } from '../../units';

export interface CombinedResponse {
  gainDb: number;
  gainUncertaintyDb: number;
  phaseDeg: number;
  phaseUncertaintyDeg: number;
}

export function combineAcquisitions(responses: StageResponse[]): CombinedResponse {
  if (responses.length === 1) {
    const [r] = responses;
    return { gainDb: r.gainDb, gainUncertaintyDb: r.gainStdDb, phaseDeg: r.phaseDeg, phaseUncertaintyDeg: r.phaseStdDeg };
  }
  const gain = meanWithStandardError(responses.map((r) => r.gainDb), responses.map((r) => r.gainStdDb));
  const referenceDeg = responses[0].phaseDeg;
  const phase = meanWithStandardError(responses.map((r) => wrapPhaseDeg(r.phaseDeg - referenceDeg)), responses.map((r) => r.phaseStdDeg));
  return { gainDb: gain.mean, gainUncertaintyDb: gain.standardError, phaseDeg: wrapPhaseDeg(referenceDeg + phase.mean), phaseUncertaintyDeg: phase.standardError };
}

/**
 * Robust mean (modified z-score rejection, app/signal averageWithOutlierRejection);
 * its standard error is the larger of the kept values' scatter s/√n and the fits'
 * own uncertainty u/√n (GUM JCGM 100:2008 §4.2, recalled from memory), so a lucky
 * low scatter of few samples cannot claim more certainty than the fits support.
 */
function meanWithStandardError(values: number[], uncertainties: number[]): { mean: number; standardError: number } {
  const robust = averageWithOutlierRejection(values);
  const kept = values.map((_, i) => i).filter((i) => !robust.rejectedIndices.includes(i));
  const fitU = Math.sqrt(kept.reduce((s, i) => s + uncertainties[i] ** 2, 0) / kept.length);
  const scatter = Number.isFinite(robust.standardError) ? robust.standardError : 0;
  return { mean: robust.mean, standardError: Math.max(scatter, fitU / Math.sqrt(kept.length)) };
}
