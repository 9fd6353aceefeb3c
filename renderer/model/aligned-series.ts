/**
 * Puts series measured on different x grids onto one shared, sorted x column,
 * as uPlot needs ([xs, ys1, ys2, …]); a series has null where it has no point,
 * and lines span those gaps. Columnar in, columnar out.
 */
import { sortedAscending } from '../../app/numeric/ascending-order';

export interface XySeries {
  xs: ArrayLike<number>;
  ys: ArrayLike<number | null>;
}

export type AlignedColumns = [number[], ...Array<Array<number | null>>];

export function alignSeries(series: XySeries[]): AlignedColumns {
  const unique = new Set<number>();
  for (const { xs } of series) for (let i = 0; i < xs.length; i++) if (Number.isFinite(xs[i])) unique.add(xs[i]);
  // Measured points come in measuring order (refinement points last); the shared column is in x order.
  const xs = sortedAscending(unique);
  const indexOf = new Map<number, number>();
  for (let i = 0; i < xs.length; i++) indexOf.set(xs[i], i);
  const columns: AlignedColumns = [xs];
  for (const one of series) {
    const column: Array<number | null> = new Array(xs.length).fill(null);
    for (let i = 0; i < one.xs.length; i++) {
      const at = indexOf.get(one.xs[i]);
      const y = one.ys[i];
      if (at !== undefined && y !== null && Number.isFinite(y)) column[at] = y;
    }
    columns.push(column);
  }
  return columns;
}
