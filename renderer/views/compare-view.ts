/**
 * Compare: overlay the gain of several runs over theory, plot each run's
 * difference from theory or from a reference run, and tabulate the figures
 * with their deltas.
 */
import { UserError } from '../../app/errors';
import type { Comparison, RolloffClient, RunFigures, RunSummary } from '../../app/contract/contract';
import { debounce, field, h, replaceChildren } from '../dom';
import { formatDb, formatDelta, formatFixed, formatHz } from '../model/format';
import { compareColumns, runColor } from '../model/compare-data';
import { guarded } from '../notices';
import { FrequencyChart } from '../plot/frequency-chart';
import { PLOT_COLORS } from '../plot/bode-plot';
import type { View } from '../shell';
import type { AppState } from '../state';
import { benchFilter, benchLabel } from './bench-filter';
import { FIGURE_NAMES } from '../../app/contract/vocabulary';

export class CompareView implements View {
  readonly id = 'compare' as const;
  readonly element: HTMLElement;
  private readonly runPicker = h('div', { className: 'run-picker', 'data-testid': 'compare-runs' });
  /** Narrows the runs offered to one bench's; runs picked before stay picked. */
  private readonly bench = benchFilter('compare');
  private readonly hiddenPicked = h('p', { className: 'hint', 'data-testid': 'compare-hidden-picked', hidden: true });
  private readonly refreshSoon = debounce(() => void guarded(undefined, 'Listing runs', () => this.listRuns()), 200);
  private readonly reference = h('select', { name: 'reference', 'data-testid': 'compare-reference' });
  private readonly overlayHost = h('div', { className: 'chart', 'data-testid': 'compare-overlay' });
  private readonly differenceHost = h('div', { className: 'chart', 'data-testid': 'compare-difference' });
  private readonly differenceTitle = h('h3', { 'data-testid': 'compare-difference-title' }, 'Difference');
  private readonly table = h('div', { className: 'figure-table', 'data-testid': 'compare-table' });
  private overlay: FrequencyChart | undefined;
  private difference: FrequencyChart | undefined;
  private runs: RunSummary[] = [];
  private chartSignature = '';

  constructor(
    private readonly client: RolloffClient,
    private readonly state: AppState,
  ) {
    const compareButton = h('button', { type: 'button', className: 'primary', 'data-testid': 'compare-run' }, 'Compare');
    compareButton.addEventListener('click', () => void guarded(compareButton, 'Comparing runs', () => this.compare()));
    this.bench.input.addEventListener('input', () => this.refreshSoon());
    this.element = h(
      'section',
      { 'aria-labelledby': 'compare-title' },
      h('h2', { id: 'compare-title' }, 'Compare'),
      h('div', { className: 'panel' }, h('h3', {}, 'Runs'), h('div', { className: 'row-form' }, field('Bench', this.bench.input), this.bench.list), this.runPicker, this.hiddenPicked, h('div', { className: 'row-form' }, field('Differences against', this.reference), compareButton)),
      h('div', { className: 'panel' }, h('h3', {}, 'Gain'), this.overlayHost, this.differenceTitle, this.differenceHost),
      h('div', { className: 'panel' }, h('h3', {}, 'Figures'), this.table),
    );
  }

  async activate(): Promise<void> {
    await this.listRuns();
    if (this.state.current.pickedRunIds.length >= 1) await this.compare();
  }

  private async listRuns(): Promise<void> {
    const bench = this.bench.value();
    const [runs, all] = await Promise.all([this.client.listRuns(bench ? { bench } : {}), bench ? this.client.listRuns() : undefined]);
    this.runs = runs;
    this.bench.offer(all ?? runs);
    this.renderPicker();
  }

  private renderPicker(): void {
    const picked = new Set(this.state.current.pickedRunIds);
    replaceChildren(
      this.runPicker,
      this.runs.length === 0
        ? h('p', { className: 'empty' }, this.bench.value() ? 'No runs of this bench.' : 'No runs yet.')
        : this.runs.map((run) => {
            const box = h('input', { type: 'checkbox', 'data-compare-run': String(run.id) });
            box.checked = picked.has(run.id);
            box.addEventListener('change', () => {
              this.state.togglePicked(run.id, box.checked);
              this.renderReference();
            });
            return h('label', { className: 'run-chip', 'data-bench': run.benchName }, box, ` #${run.id} ${run.designName} — ${run.buildLabel} (${run.status}), bench ${benchLabel(run)}`);
          }),
    );
    const shown = new Set(this.runs.map((run) => run.id));
    const hidden = this.state.current.pickedRunIds.filter((id) => !shown.has(id)).length;
    this.hiddenPicked.hidden = hidden === 0;
    this.hiddenPicked.textContent = hidden === 0 ? '' : `${hidden} picked run${hidden === 1 ? '' : 's'} of other benches not listed here; still compared.`;
    this.renderReference();
  }

  private renderReference(): void {
    const previous = this.reference.value;
    const options = [h('option', { value: 'theory' }, 'theory of each run'), ...this.state.current.pickedRunIds.map((id) => h('option', { value: String(id) }, `run #${id}`))];
    replaceChildren(this.reference, options);
    if ([...this.reference.options].some((o) => o.value === previous)) this.reference.value = previous;
  }

  private async compare(): Promise<void> {
    const runIds = this.state.current.pickedRunIds;
    if (runIds.length === 0) throw new UserError('No run picked to compare.', 'Tick one or more runs above or in History (Alt+4).');
    const reference = this.reference.value === 'theory' || this.reference.value === '' ? 'theory' : Number(this.reference.value);
    const comparison = await this.client.compareRuns(runIds, reference);
    this.show(comparison);
  }

  /** Draws a comparison; public so the render benchmark can time exactly this. */
  show(comparison: Comparison): void {
    const labels = comparison.runs.map((run) => `#${run.id} ${run.buildLabel}`);
    const yLabel = comparison.referenceRunId === 'theory' ? 'Measured − theory (dB)' : `Measured − run #${comparison.referenceRunId} (dB)`;
    this.differenceTitle.textContent = comparison.referenceRunId === 'theory' ? 'Difference from theory' : `Difference from run #${comparison.referenceRunId}`;
    const columns = compareColumns(comparison);
    const first = comparison.runs[0];
    const markers = first?.theoryGainLimitHz !== undefined ? [{ xHz: first.theoryGainLimitHz, label: `gain limit (theory) ${formatHz(first.theoryGainLimitHz)}`, color: PLOT_COLORS.gainLimit }] : [];
    // Charts are rebuilt only when the set of runs changes; otherwise new data is enough.
    const signature = JSON.stringify([labels, yLabel]);
    if (signature === this.chartSignature && this.overlay && this.difference) {
      this.overlay.setData(columns.overlay, markers);
      this.difference.setData(columns.difference, []);
    } else {
      this.overlay?.destroy();
      this.difference?.destroy();
      this.chartSignature = signature;
      // Many runs: lines only (dots would hide each other and cost a draw per point), colours named in the table, not a legend.
      const many = labels.length > 8;
      const kind = many ? ('line' as const) : ('points-line' as const);
      const runSeries = labels.map((label, i) => ({ label, color: runColor(i, labels.length), kind, width: many ? 1 : 1.25, pointSize: 4 }));
      this.overlay = new FrequencyChart(
        this.overlayHost,
        { yLabel: 'Gain (dB)', yUnit: 'dB', height: 320, legend: !many, series: [{ label: 'Theory (first run)', color: PLOT_COLORS.theory, kind: 'line' }, ...runSeries] },
        { columns: columns.overlay, markers },
      );
      this.difference = new FrequencyChart(this.differenceHost, { yLabel, yUnit: 'dB', height: 220, legend: false, series: runSeries }, { columns: columns.difference, markers: [] });
    }
    this.element.dataset.comparedRuns = String(comparison.runs.length);
    this.renderTable(comparison);
  }

  private renderTable(comparison: Comparison): void {
    const rows: Array<[string, keyof RunFigures, (v: number | undefined) => string, string]> = [
      ['Pass-band gain', 'passbandGainDb', (v) => formatDb(v), 'dB'],
      [FIGURE_NAMES.gainLimitHz, 'gainLimitHz', formatHz, 'Hz'],
      ['GBW estimate', 'gbwEstimateHz', formatHz, 'Hz'],
      ['Roll-off (dB/decade)', 'rolloffDbPerDecade', (v) => (v === undefined ? '—' : formatFixed(v, 1)), 'dB/dec'],
      [FIGURE_NAMES.maxDeviationDb, 'maxDeviationDb', (v) => formatDb(v), 'dB'],
    ];
    replaceChildren(
      this.table,
      h('table', { className: 'data-table' },
        h('thead', {}, h('tr', {}, h('th', { scope: 'col' }, 'Run'), rows.map(([title]) => h('th', { scope: 'col' }, title)), h('th', { scope: 'col' }, FIGURE_NAMES.minus3dbHz), h('th', { scope: 'col' }, 'Verdict'))),
        h('tbody', {}, comparison.figureTable.map((entry) =>
          h('tr', {},
            h('th', { scope: 'row' }, colourSwatch(runColor(comparison.runs.findIndex((r) => r.id === entry.runId), comparison.runs.length)), entry.label),
            rows.map(([, key, format, unit]) => {
              const value = entry.figures[key] as number | undefined;
              const delta = entry.deltas[key];
              return h('td', {}, format(value), delta !== undefined ? h('small', { className: 'delta' }, ` (${formatDelta(delta, unit === 'Hz' ? 'Hz' : unit)})`) : null);
            }),
            h('td', {}, entry.figures.minus3dbHz.map((f) => formatHz(f)).join(', ') || '—'),
            h('td', {}, entry.verdict ? h('span', { className: `badge ${entry.verdict.pass ? 'pass' : 'fail'}`, title: entry.verdict.reasons.join('; ') }, entry.verdict.pass ? 'pass' : 'fail') : '—'),
          ),
        )),
      ),
    );
  }
}

/** A colour key for a run; set through the style object (CSSOM), which the page's CSP allows. */
function colourSwatch(color: string): HTMLElement {
  const swatch = h('span', { className: 'swatch', 'aria-hidden': 'true' });
  swatch.style.background = color;
  return swatch;
}
