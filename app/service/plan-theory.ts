/** What the sweep planner needs of a build's theory (app/sweep/plan PlanTheory), from the theory engine. */
import { type Design, solveAc, stimulusLimitVpk, slowestTimeConstantS } from '../circuit';
import type { PlanTheory } from '../sweep/plan';
import { ratioFromDb } from '../units';

export function planTheoryFor(design: Design): PlanTheory {
  const one = new Float64Array(1);
  return {
    slowestTimeConstantS: slowestTimeConstantS(design),
    gainRatioAt(frequencyHz) {
      one[0] = frequencyHz;
      return ratioFromDb(solveAc(design, one).gainDb[0]);
    },
    stimulusLimitVpkAt: (frequencyHz) => stimulusLimitVpk(design, frequencyHz),
  };
}
