/**
 * History: designs, builds and runs, searchable. Runs left running or paused
 * by a crash or a stop are offered for resume; runs can be picked for
 * Compare and Record, or reopened on the Sweep view.
 */
import { RUN_STATUSES, type BuildRecord, type DesignRecord, type RolloffClient, type RunFilter, type RunStatus, type RunSummary } from '../../app/contract/contract';
import { runStateText, shownStatus } from '../../app/contract/run-owner-text';
import { instantText } from '../../app/contract/bench-text';
import { RUN_KIND_NAMES, summaryPointCountText } from '../../app/contract/vocabulary';
import { debounce, field, h, replaceChildren, select } from '../dom';
import { guarded, partFailureSlot, showPartResult } from '../notices';
import { resumeConfirmingTakeOver } from './take-over-dialog';
import type { View } from '../shell';
import { benchFilter, benchLabel } from './bench-filter';
import type { AppState } from '../state';

const STATUSES: Array<RunStatus | ''> = ['', ...RUN_STATUSES];

export class HistoryView implements View {
  readonly id = 'history' as const;
  readonly element: HTMLElement;
  private readonly runsFailure = partFailureSlot('runs-failure');
  private readonly designsFailure = partFailureSlot('history-designs-failure');
  private readonly search = h('input', { type: 'search', name: 'search', placeholder: 'design, build, operator, notes…', 'data-testid': 'history-search' });
  private readonly status = select(STATUSES.map((s) => ({ value: s, label: s || 'any status' })), '', { name: 'status' });
  /** A bench's exact name; the list offers the benches of the runs shown unfiltered. */
  private readonly bench = benchFilter('history');
  private readonly runsBody = h('tbody', { 'data-testid': 'history-runs' });
  private readonly designsBody = h('tbody');
  private readonly interrupted = h('div', { className: 'interrupted', 'data-testid': 'interrupted-runs' });
  private readonly pickedText = h('span', { 'data-testid': 'picked-count' });
  private readonly refreshSoon = debounce(() => void this.refresh(), 200);

  constructor(
    private readonly client: RolloffClient,
    private readonly state: AppState,
  ) {
    this.search.addEventListener('input', () => this.refreshSoon());
    this.status.addEventListener('change', () => this.refreshSoon());
    this.bench.input.addEventListener('input', () => this.refreshSoon());
    const compare = h('button', { type: 'button', className: 'primary', 'data-testid': 'compare-picked' }, 'Compare picked runs');
    compare.addEventListener('click', () => state.showView('compare'));
    const record = h('button', { type: 'button' }, 'Record of picked runs');
    record.addEventListener('click', () => state.showView('record'));
    this.element = h(
      'section',
      { 'aria-labelledby': 'history-title' },
      h('h2', { id: 'history-title' }, 'History'),
      this.interrupted,
      h('div', { className: 'panel' },
        this.runsFailure,
        h('div', { className: 'row-form' }, field('Search', this.search), field('Status', this.status), field('Bench', this.bench.input), this.bench.list, h('div', { className: 'actions' }, this.pickedText, compare, record)),
        h('table', { className: 'data-table' },
          h('thead', {}, h('tr', {}, ['Pick', 'Run', 'Design', 'Build', 'Bench', 'Kind', 'Status', 'Started', 'Points', ''].map((t) => h('th', { scope: 'col' }, t)))),
          this.runsBody,
        ),
      ),
      h('div', { className: 'panel' }, h('h3', {}, 'Designs and builds'), this.designsFailure, h('table', { className: 'data-table' }, h('thead', {}, h('tr', {}, ['Design', 'Saved', 'Builds'].map((t) => h('th', { scope: 'col' }, t)))), this.designsBody)),
    );
    state.subscribe((s, changed) => {
      if (changed.includes('pickedRunIds')) this.pickedText.textContent = `${s.pickedRunIds.length} picked`;
    });
    this.pickedText.textContent = '0 picked';
  }

  async activate(): Promise<void> {
    await this.refresh();
  }

  private async refresh(): Promise<void> {
    const filter: RunFilter = {};
    if (this.search.value.trim()) filter.search = this.search.value.trim();
    if (this.status.value) filter.status = this.status.value as RunStatus;
    const bench = this.bench.value();
    if (bench) filter.bench = bench;
    // Runs, designs and builds on their own: a failing one says so inline above its table, the others still fill in.
    const [runList, designList, buildList, allList] = await Promise.allSettled([
      this.client.listRuns(filter),
      this.client.listDesigns(),
      this.client.listBuilds(),
      this.client.listRuns(),
    ]);
    const designsAndBuilds = designList.status === 'rejected' ? designList : buildList;
    showPartResult(this.runsFailure, 'The runs', runList.status === 'rejected' ? runList : allList);
    showPartResult(this.designsFailure, 'The designs and builds', designsAndBuilds);
    if (runList.status === 'fulfilled') this.renderRuns(runList.value);
    if (allList.status === 'fulfilled') this.renderOpenRuns(allList.value);
    if (designList.status === 'fulfilled' && buildList.status === 'fulfilled') this.renderDesigns(designList.value, buildList.value);
  }

  private renderRuns(runs: RunSummary[]): void {
    replaceChildren(this.runsBody, runs.length === 0 ? h('tr', {}, h('td', { colspan: '10', className: 'empty' }, 'No runs match.')) : runs.map((run) => this.runRow(run)));
  }

  private renderOpenRuns(allOpen: RunSummary[]): void {
    this.bench.offer(allOpen);
    // A run some process drives now is not offered: only its driver may pause, stop or continue it. One paused on the
    // Sweep view is continued there; one interrupted is offered wherever it is shown.
    const resumable = allOpen.filter((run) => (run.status === 'running' || run.status === 'paused') && !run.owner?.live && (run.id !== this.state.current.sweepRunId || shownStatus(run) === 'interrupted'));
    replaceChildren(
      this.interrupted,
      resumable.length === 0
        ? null
        : h('div', { className: 'panel attention' }, h('h3', {}, 'Unfinished runs'), h('p', {}, 'These runs did not finish (paused, or interrupted when the app stopped). Every point measured so far is kept; resuming continues with the next step.'),
            h('ul', {}, resumable.map((run) => h('li', {}, `Run #${run.id} ${run.designName} — ${run.buildLabel}: ${summaryPointCountText(run.plannedCount, run.pointCount)} points (${shownStatus(run)}) `, this.resumeButton(run))))),
    );
  }

  private renderDesigns(designs: DesignRecord[], builds: BuildRecord[]): void {
    // The same search words narrow the designs table (by design name or build label).
    const words = this.search.value.trim().toLowerCase();
    const matching = words === '' ? designs : designs.filter((d) => d.name.toLowerCase().includes(words) || builds.some((b) => b.designId === d.id && b.label.toLowerCase().includes(words)));
    replaceChildren(
      this.designsBody,
      matching.length === 0 ? h('tr', {}, h('td', { colspan: '3', className: 'empty' }, 'No designs match.')) : matching.map((design) =>
        h('tr', {}, h('th', { scope: 'row' }, `${design.name} (#${design.id})`), h('td', {}, design.createdAt.slice(0, 16).replace('T', ' ')), h('td', {}, builds.filter((b) => b.designId === design.id).map((b) => b.label).join(', ') || '—')),
      ),
    );
  }

  private runRow(run: RunSummary): HTMLTableRowElement {
    const pick = h('input', { type: 'checkbox', 'aria-label': `Pick run ${run.id}`, 'data-pick-run': String(run.id) });
    pick.checked = this.state.current.pickedRunIds.includes(run.id);
    pick.addEventListener('change', () => this.state.togglePicked(run.id, pick.checked));
    const open = h('button', { type: 'button', className: 'small' }, 'Open');
    open.addEventListener('click', () => {
      this.state.update({ sweepRunId: run.id });
      this.state.showView('sweep');
    });
    const unfinished = run.pointCount < run.plannedCount && run.status !== 'planned' && !run.owner?.live && (run.status !== 'running' || shownStatus(run) === 'interrupted');
    const status = shownStatus(run);
    const state = runStateText(run);
    return h(
      'tr',
      { 'data-run': String(run.id) },
      h('td', {}, pick),
      h('th', { scope: 'row' }, `#${run.id}`),
      h('td', {}, run.designName),
      h('td', {}, run.buildLabel),
      h('td', {}, benchLabel(run)),
      h('td', {}, RUN_KIND_NAMES[run.kind]),
      h('td', { 'data-testid': 'run-state' },
        h('span', { className: `badge status-${status}` }, status),
        run.simulated ? h('span', { className: 'badge simulated' }, 'simulated') : null,
        state ? h('small', { className: 'run-driver' }, state) : null,
      ),
      h('td', {}, run.startedAt ? instantText(run.startedAt) : '—'),
      h('td', {}, summaryPointCountText(run.plannedCount, run.pointCount)),
      h('td', {}, open, unfinished ? this.resumeButton(run) : null),
    );
  }

  private resumeButton(run: RunSummary): HTMLButtonElement {
    const button = h('button', { type: 'button', className: 'small', 'data-resume-run': String(run.id) }, 'Resume');
    button.addEventListener('click', () => void guarded(button, `Resuming run #${run.id}`, async () => {
      if (!(await resumeConfirmingTakeOver(this.client, run))) return;
      this.state.update({ sweepRunId: run.id });
      this.state.showView('sweep');
    }));
    return button;
  }
}
