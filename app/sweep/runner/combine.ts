/**
 * Several acquisitions of one step reduced to one point. Phases are averaged
 * as deviations from the first acquisition so a jump across ±180° cannot
 * cancel out.
 */
import type { StageResponse } from '../../signal';
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
 * Mean of n values; its standard error is the larger of the scatter-based
 * s/√n and the fits' own uncertainty combined as u/√n (GUM JCGM 100:2008
 * §4.2, recalled from memory), so a lucky low scatter of few samples cannot
 * claim more certainty than the fits support.
 */
function meanWithStandardError(values: number[], uncertainties: number[]): { mean: number; standardError: number } {
  const n = values.length;
  const mean = values.reduce((s, v) => s + v, 0) / n;
  const variance = values.reduce((s, v) => s + (v - mean) ** 2, 0) / (n - 1);
  const fitU = Math.sqrt(uncertainties.reduce((s, u) => s + u * u, 0) / n);
  return { mean, standardError: Math.max(Math.sqrt(variance / n), fitU / Math.sqrt(n)) };
}
