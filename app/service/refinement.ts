/**
 * Refinement of an AC run: after the coarse pass, extra points where the
 * measured response departs from the ideal op-amp's and near the −3 dB and
 * gain-limit points (app/sweep/plan: refinementFrequencies), at most
 * maxRefinementPoints in all, planned as the coarse ones were.
 */
import { type Design, solveAc } from '../circuit';
import { planStepsAt, refinementFrequencies, type PlanInput } from '../sweep/plan';
import type { StepSetting } from '../sweep/runner/types';
import { PointFlag, type PointColumns } from '../contract/contract';

/** The runner's nextExtraSteps for a run of this design and plan input. */
export function refinementSteps(design: Design, planInput: PlanInput, maxRefinement: number, averages: number) {
  return (points: PointColumns, firstStep: number): StepSetting[] => {
    const refinedSoFar = points.flags.filter((f) => (f & PointFlag.refinement) !== 0).length;
    const room = maxRefinement - refinedSoFar;
    if (room <= 0) return [];
    const usable = points.stimulus.map((_, i) => i).filter((i) => Number.isFinite(points.gainDb[i]) && (points.flags[i] & (PointFlag.overrange | PointFlag.notANumber)) === 0);
    const frequencyHz = usable.map((i) => points.stimulus[i]);
    const gainDb = usable.map((i) => points.gainDb[i]);
    const ideal = idealAt(design, frequencyHz);
    const phaseDeg = usable.map((i) => points.phaseDeg[i]);
    const wanted = refinementFrequencies({ frequencyHz, gainDb, idealGainDb: ideal.gainDb, phaseDeg, idealPhaseDeg: ideal.phaseDeg }).slice(0, room);
    if (wanted.length === 0) return [];
    const extra = planStepsAt(Float64Array.from(wanted), planInput).columns;
    return wanted.map((stimulus, k) => ({ step: firstStep + k, stimulus, amplitudeVpp: extra.amplitudeVpp[k], settleS: extra.settleS[k], integrateS: extra.integrateS[k], averages, refinement: true }));
  };
}

/** Ideal-op-amp response of the build at the measured frequencies (refinement targets). */
function idealAt(design: Design, frequencyHz: number[]): { gainDb: number[]; phaseDeg: number[] } {
  if (frequencyHz.length === 0) return { gainDb: [], phaseDeg: [] };
  const response = solveAc(design, Float64Array.from(frequencyHz));
  return { gainDb: Array.from(response.idealGainDb), phaseDeg: Array.from(response.idealPhaseDeg) };
}
