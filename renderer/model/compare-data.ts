/** Plot columns for the Compare view, built from the service's Comparison. */
import type { Comparison } from '../../app/contract/contract';
import { alignSeries, type AlignedColumns } from './aligned-series';

export function compareColumns(comparison: Comparison): { overlay: AlignedColumns; difference: AlignedColumns } {
  const theory = comparison.runs[0]?.theory;
  const overlay = alignSeries([
    { xs: theory?.frequencyHz ?? [], ys: theory?.gainDb ?? [] },
    ...comparison.runs.map((run) => ({ xs: run.points.stimulus, ys: run.points.gainDb })),
  ]);
  const byRun = new Map(comparison.differences.map((d) => [d.runId, d]));
  const difference = alignSeries(comparison.runs.map((run) => ({ xs: byRun.get(run.id)?.stimulus ?? [], ys: byRun.get(run.id)?.deltaDb ?? [] })));
  return { overlay, difference };
}

/** The run colours of the records too (app/contract/plot-palette.ts). */
export { runColour as runColor } from '../../app/contract/plot-palette';
