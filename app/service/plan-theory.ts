/** What the sweep planner needs of a build's theory (app/sweep/plan PlanTheory), from the theory engine. */
import { type Design, gainRatioFunction, stimulusLimitVpk, slowestTimeConstantS } from '../circuit';
import type { PlanTheory } from '../sweep/plan';

export function planTheoryFor(design: Design): PlanTheory {
  return {
    slowestTimeConstantS: slowestTimeConstantS(design),
    gainRatioAt: gainRatioFunction(design),
    stimulusLimitVpkAt: (frequencyHz) => stimulusLimitVpk(design, frequencyHz),
  };
}
