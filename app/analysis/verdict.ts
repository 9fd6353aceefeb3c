/**
 * Pass/fail against the user's limits (VerdictLimits in the contract).
 */
import type { Verdict, VerdictLimits } from '../contract/contract';
import { formatEngineering, formatFixed, withTrueMinus } from '../units';

export interface VerdictInputs {
  limits: VerdictLimits | undefined;
  /** Largest |measured − theory| over the pass band, with where it happened. */
  largestPassbandDeviation: { deviationDb: number; frequencyHz: number } | undefined;
  measuredMinus3dbHz: number[];
  theoryMinus3dbHz: number[];
  measuredPassbandGainDb: number | undefined;
}

/** Null when the user set no limits: no verdict rather than an empty "pass". */
export function judge(inputs: VerdictInputs): Verdict | null {
  const { limits } = inputs;
  if (!limits || (limits.maxDeviationDb === undefined && limits.cornerTolerance === undefined && limits.passbandGainDb === undefined)) return null;
  const reasons: string[] = [];
  let pass = true;

  if (limits.maxDeviationDb !== undefined) {
    const worst = inputs.largestPassbandDeviation;
    if (!worst) {
      pass = false;
      reasons.push('No pass-band points to compare with theory.');
    } else {
      const ok = Math.abs(worst.deviationDb) <= limits.maxDeviationDb;
      pass &&= ok;
      reasons.push(
        `Largest pass-band deviation ${formatFixed(worst.deviationDb, 3)} dB at ${formatEngineering(worst.frequencyHz, 'Hz')} ` +
          `${ok ? 'within' : 'exceeds'} the limit ±${limits.maxDeviationDb} dB.`,
      );
    }
  }

  if (limits.cornerTolerance !== undefined) {
    for (const theoryHz of inputs.theoryMinus3dbHz) {
      const nearest = nearestInLog(inputs.measuredMinus3dbHz, theoryHz);
      if (nearest === undefined) {
        pass = false;
        reasons.push(`Theory −3 dB point ${formatEngineering(theoryHz, 'Hz')} not found in the measurement.`);
        continue;
      }
      const relative = nearest / theoryHz - 1;
      const ok = Math.abs(relative) <= limits.cornerTolerance;
      pass &&= ok;
      reasons.push(
        `−3 dB point ${formatEngineering(nearest, 'Hz')} vs theory ${formatEngineering(theoryHz, 'Hz')}: ` +
          `${formatFixed(relative * 100, 2)} % ${ok ? 'within' : 'outside'} ±${(limits.cornerTolerance * 100).toFixed(2)} %.`,
      );
    }
  }

  if (limits.passbandGainDb !== undefined) {
    const [lowDb, highDb] = limits.passbandGainDb;
    const gain = inputs.measuredPassbandGainDb;
    const ok = gain !== undefined && gain >= lowDb && gain <= highDb;
    pass &&= ok;
    reasons.push(
      gain === undefined
        ? 'Pass-band gain could not be measured.'
        : `Pass-band gain ${formatFixed(gain, 3)} dB ${ok ? 'inside' : 'outside'} [${withTrueMinus(String(lowDb))}, ${withTrueMinus(String(highDb))}] dB.`,
    );
  }
  return { pass, reasons };
}

function nearestInLog(candidates: number[], target: number): number | undefined {
  let best: number | undefined;
  for (const c of candidates) if (best === undefined || Math.abs(Math.log(c / target)) < Math.abs(Math.log(best / target))) best = c;
  return best;
}
