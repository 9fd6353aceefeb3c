/**
 * Figures, per-point flags and the verdict of one AC run, from its measured
 * points and the theory evaluated at the same frequencies.
 */
import type { RunFigures, Verdict, VerdictLimits } from '../contract/contract';
import { PointFlag } from '../contract/contract';
import { deviationDb, largestDeviation, outsideBand } from './deviation';
import { loopGainLimitHz, magnitudeGainLimitHz, pastGainLimit } from './gain-limit';
import { HALF_POWER_DB, minus3dbFrequenciesHz, passbandGainDb } from './passband';
import { rolloffDbPerDecade } from './rolloff';
import { judge } from './verdict';
import { isUsablePoint } from './usable-points';
import { measuredStability } from './stability-estimate';

export interface MeasuredAcColumns {
  frequencyHz: ArrayLike<number>;
  gainDb: ArrayLike<number>;
  gainUncertaintyDb: ArrayLike<number>;
  phaseDeg: ArrayLike<number>;
  flags: ArrayLike<number>;
}

/** Theory at the measured frequencies (solveAc of the build's actual circuit). */
export interface TheoryAtPoints {
  gainDb: ArrayLike<number>;
  idealGainDb: ArrayLike<number>;
  /** Ideal-op-amp phase; with measured phases it lets the gain-limit point be found from the loop gain. */
  idealPhaseDeg?: ArrayLike<number>;
  bandLowDb?: ArrayLike<number>;
  bandHighDb?: ArrayLike<number>;
  gainLimitHz: number | undefined;
  minus3dbHz: number[];
}

/** Supplied by the caller from app/signal's single-pole fit, so this stays a pure function of its inputs. */
export interface GbwEstimate {
  gbwHz: number;
  gbwUncertaintyHz: number;
}

export interface AcAnalysis {
  figures: RunFigures;
  /** The input flags with outsideToleranceBand and pastGainLimit set or cleared. */
  flags: Int32Array;
  deviationDb: Float64Array;
  verdict: Verdict | null;
}

const ANALYSIS_FLAGS = PointFlag.outsideToleranceBand | PointFlag.pastGainLimit;

export function analyzeAcRun(
  measured: MeasuredAcColumns,
  theory: TheoryAtPoints,
  limits: VerdictLimits | undefined,
  gbw?: GbwEstimate,
): AcAnalysis {
  const count = measured.frequencyHz.length;
  const usable = (i: number) => isUsablePoint(measured.flags, measured.gainDb, i);
  const freq: number[] = [];
  const gain: number[] = [];
  const phase: number[] = [];
  const ideal: number[] = [];
  const idealPhase: number[] = [];
  for (let i = 0; i < count; i++) {
    if (!usable(i)) continue;
    freq.push(measured.frequencyHz[i]);
    gain.push(measured.gainDb[i]);
    phase.push(measured.phaseDeg[i]);
    ideal.push(theory.idealGainDb[i]);
    idealPhase.push(theory.idealPhaseDeg?.[i] ?? NaN);
  }
  const withPhase = freq.length > 0 && phase.every(Number.isFinite) && idealPhase.every(Number.isFinite);
  const passband = passbandGainDb(freq, gain);
  const deviations = deviationDb(measured.gainDb, theory.gainDb);
  const theoryPassband = passbandGainDb(measured.frequencyHz, theory.gainDb);
  const inPassband = (i: number) => usable(i) && theoryPassband !== undefined && theory.gainDb[i] >= theoryPassband + HALF_POWER_DB;
  const worst = largestDeviation(measured.frequencyHz, deviations, inPassband);

  const flags = Int32Array.from(measured.flags, (f) => f & ~ANALYSIS_FLAGS);
  const past = pastGainLimit(measured.frequencyHz, theory.gainLimitHz);
  const outside = theory.bandLowDb && theory.bandHighDb
    ? outsideBand(measured.gainDb, measured.gainUncertaintyDb, theory.bandLowDb, theory.bandHighDb)
    : undefined;
  for (let i = 0; i < count; i++) {
    if (past[i]) flags[i] |= PointFlag.pastGainLimit;
    if (outside?.[i] && usable(i)) flags[i] |= PointFlag.outsideToleranceBand;
  }

  const stability = measuredStability(gain, ideal);
  const minus3dbHz = passband === undefined ? [] : minus3dbFrequenciesHz(freq, gain, passband);
  const figures: RunFigures = {
    passbandGainDb: passband,
    minus3dbHz,
    rolloffDbPerDecade: passband === undefined ? undefined : rolloffDbPerDecade(freq, gain, passband),
    gainLimitHz: withPhase ? loopGainLimitHz(freq, gain, phase, ideal, idealPhase) : magnitudeGainLimitHz(freq, gain, ideal),
    gbwEstimateHz: gbw?.gbwHz,
    gbwUncertaintyHz: gbw?.gbwUncertaintyHz,
    maxDeviationDb: worst?.deviationDb,
    ...stability,
  };
  const verdict = judge({
    limits,
    largestPassbandDeviation: worst,
    measuredMinus3dbHz: minus3dbHz,
    theoryMinus3dbHz: theory.minus3dbHz,
    measuredPassbandGainDb: passband,
  });
  return { figures, flags, deviationDb: deviations, verdict };
}
