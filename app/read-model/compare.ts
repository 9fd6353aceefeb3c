/**
 * Several runs side by side: each against theory or a reference run, with a
 * table of figures and their differences from the reference.
 */
import type { Comparison, RunDetail, RunFigures } from '../contract/contract';
import { ValidationError } from '../errors';
import { ascendingOrder } from '../numeric';

export function compareDetails(runs: RunDetail[], reference: number | 'theory'): Comparison {
  const referenceRun = reference === 'theory' ? undefined : runs.find((r) => r.id === reference);
  if (reference !== 'theory' && !referenceRun) {
    throw new ValidationError('reference', `run ${reference} is not among the compared runs`, 'Pick one of the compared runs, or "theory".');
  }
  const referenceRunDbAt = referenceRun ? logFInterpolator(referenceRun.points.stimulus, referenceRun.points.gainDb) : undefined;
  const differences = runs.map((run) => {
    const stimulus = run.points.stimulus;
    const referenceDbAt = referenceRunDbAt ?? logFInterpolator(run.theory.frequencyHz, run.theory.gainDb);
    const deltaDb = stimulus.map((f, i) => run.points.gainDb[i] - referenceDbAt(f));
    return { runId: run.id, stimulus, deltaDb };
  });
  const figureTable = runs.map((run) => {
    const base: RunFigures = referenceRun
      ? referenceRun.figures
      : { minus3dbHz: run.theoryMinus3dbHz, gainLimitHz: run.theoryGainLimitHz };
    return { runId: run.id, label: `${run.buildLabel} (run ${run.id})`, figures: run.figures, deltas: figureDeltas(run.figures, base), verdict: run.verdict };
  });
  return { runs, referenceRunId: reference, differences, figureTable };
}

/** Numeric figure differences (run − reference); the first −3 dB point stands for the list. */
function figureDeltas(figures: RunFigures, reference: RunFigures): Partial<Record<keyof RunFigures, number>> {
  const deltas: Partial<Record<keyof RunFigures, number>> = {};
  for (const key of ['passbandGainDb', 'rolloffDbPerDecade', 'gainLimitHz', 'gbwEstimateHz', 'maxDeviationDb'] as const) {
    const a = figures[key];
    const b = reference[key];
    if (typeof a === 'number' && typeof b === 'number') deltas[key] = a - b;
  }
  if (figures.minus3dbHz.length > 0 && reference.minus3dbHz.length > 0) deltas.minus3dbHz = figures.minus3dbHz[0] - reference.minus3dbHz[0];
  return deltas;
}

/**
 * Value at f, linear in log f over the finite points, put in frequency order once here (refinement points
 * are stored last); NaN outside the range.
 */
function logFInterpolator(frequencyHz: number[], values: number[]): (atHz: number) => number {
  const order = ascendingOrder(frequencyHz).filter((i) => Number.isFinite(values[i]));
  return (atHz) => {
    for (let k = 0; k < order.length; k++) {
      const i = order[k];
      if (frequencyHz[i] === atHz) return values[i];
      if (frequencyHz[i] > atHz) {
        if (k === 0) return NaN;
        const j = order[k - 1];
        const t = Math.log(atHz / frequencyHz[j]) / Math.log(frequencyHz[i] / frequencyHz[j]);
        return values[j] + t * (values[i] - values[j]);
      }
    }
    return NaN;
  };
}
