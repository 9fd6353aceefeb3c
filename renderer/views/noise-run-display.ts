/**
 * How the Sweep view shows a noise run: the density plot (measured with its
 * 95 % interval over the computed density, log-log) and the run's figures in
 * the wording every surface uses (app/analysis/noise-figure-rows.ts). A run
 * still measuring is read again as its records arrive (progress events),
 * at most every REFRESH_MS.
 */
import type { NoiseRunDetail } from '../../app/contract/contract';
import { noiseFigureRows } from '../../app/analysis/noise-figure-rows';
import { h, replaceChildren } from '../dom';
import { NoisePlot } from '../plot/noise-plot';

const REFRESH_MS = 500;

export class NoiseRunDisplay {
  readonly plot = new NoisePlot();
  private refreshTimer: ReturnType<typeof setTimeout> | undefined;
  /** A record arrived since the last read began: read again once that read is done. */
  private stale = false;
  private reading = false;

  constructor(
    readonly runId: number,
    private readonly read: () => Promise<NoiseRunDetail>,
    private readonly figuresElement: HTMLElement,
    private readonly onDetail: (detail: NoiseRunDetail) => void,
  ) {}

  show(detail: NoiseRunDetail): void {
    this.plot.setDensity(detail.density);
    const figures = detail.figures.noise;
    replaceChildren(
      this.figuresElement,
      figures
        ? noiseFigureRows(figures).flatMap(([term, value]) => [h('dt', {}, term), h('dd', {}, value)])
        : h('p', { className: 'empty' }, 'Figures appear when the run has its first record.'),
    );
  }

  /** A record was stored: read the run again soon (records close together cost one read; none is missed). */
  recordArrived(): void {
    this.stale = true;
    if (this.refreshTimer !== undefined || this.reading) return;
    this.refreshTimer = setTimeout(() => {
      this.refreshTimer = undefined;
      this.stale = false;
      this.reading = true;
      void this.read()
        .then((detail) => {
          this.show(detail);
          this.onDetail(detail);
        }, () => undefined)
        .finally(() => {
          this.reading = false;
          if (this.stale) this.recordArrived();
        });
    }, REFRESH_MS);
  }

  destroy(): void {
    if (this.refreshTimer !== undefined) clearTimeout(this.refreshTimer);
    this.plot.destroy();
  }
}
