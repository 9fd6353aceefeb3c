/**
 * Stimulus amplitude per frequency. The user's maximum is a hard ceiling:
 * a fixed amplitude above it is refused, an automatic one is capped by it.
 */
import type { PlanTheory } from './types';

export interface AmplitudeLimits {
  maxStimulusVpp: number;
  generatorMaxVpp: number;
  generatorMinVpp: number;
  measurementMaxVpk: number | undefined;
  margin: number;
}

export interface AmplitudeChoice {
  amplitudeVpp: number;
  /** Set when no amplitude satisfies every limit (the generator's minimum is above the linear limit). */
  problem?: string;
}

/**
 * Automatic amplitude at one frequency: the largest input (best signal-to-noise)
 * that keeps the output inside the rails and under the slew limit, and the
 * output inside the meter's range — each with margin — or the amplitude that
 * gives the requested output, whichever is smaller.
 */
export function autoAmplitudeVpp(
  frequencyHz: number,
  theory: PlanTheory,
  limits: AmplitudeLimits,
  targetOutputVpp?: number,
): AmplitudeChoice {
  const gain = theory.gainRatioAt(frequencyHz);
  const candidatesVpp = [limits.maxStimulusVpp, limits.generatorMaxVpp, 2 * limits.margin * theory.stimulusLimitVpkAt(frequencyHz)];
  if (limits.measurementMaxVpk !== undefined && gain > 0) candidatesVpp.push((2 * limits.margin * limits.measurementMaxVpk) / gain);
  if (targetOutputVpp !== undefined && gain > 0) candidatesVpp.push(targetOutputVpp / gain);
  const chosen = Math.min(...candidatesVpp.filter((v) => Number.isFinite(v) && v > 0));
  if (!(chosen >= limits.generatorMinVpp)) {
    return {
      amplitudeVpp: Math.min(limits.generatorMinVpp, limits.maxStimulusVpp),
      problem: `the linear limit (${chosen.toPrecision(3)} Vpp) is below the generator's minimum ${limits.generatorMinVpp} Vpp`,
    };
  }
  return { amplitudeVpp: chosen };
}

/** For a fixed amplitude: true where theory says the output would clip or slew (distortion expected). */
export function fixedAmplitudeDistorts(frequencyHz: number, amplitudeVpp: number, theory: PlanTheory): boolean {
  return amplitudeVpp / 2 > theory.stimulusLimitVpkAt(frequencyHz);
}
