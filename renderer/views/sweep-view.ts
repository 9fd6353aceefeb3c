/**
 * Sweep: plan settings with the estimated duration, start / pause / resume /
 * stop, the live Bode plot (measured over theory, band, gain-limit and −3 dB
 * points, distorted points marked), progress with ETA, and the run's events.
 * A noise run opened here (from History) shows its density plot instead
 * (noise-run-display.ts).
 */
import { SWEEP_DEFAULTS, SWEEP_RANGE_DEFAULTS } from '../../app/sweep/plan/defaults';
import { UserError } from '../../app/errors';
import type { BuildRecord, NoiseRunDetail, RolloffClient, RunDetail, RunFigures, RunProgress, RunStatus, RunSummary, SweepRequest, Verdict } from '../../app/contract/contract';
import { formatEngineering, formatFixed, formatWithUncertainty, logGrid, parseEngineering } from '../../app/units';
import { parseDesign, solveDcTransfer, withActualValues } from '../../app/circuit';
import { debounce, field, h, replaceChildren, select } from '../dom';
import { asSentence, formatDb, formatDuration, formatHz } from '../model/format';
import { figureRows } from '../model/figure-rows';
import { LivePoints } from '../model/live-points';
import { guarded, partFailureSlot, showError, showPartResult } from '../notices';
import { BodePlot } from '../plot/bode-plot';
import { NoiseRunDisplay } from './noise-run-display';
import type { View } from '../shell';
import type { AppState } from '../state';
import { FIGURE_NAMES, pointCountText, SETTINGS } from '../../app/contract/vocabulary';
import { runStateText, shownStatus } from '../../app/contract/run-owner-text';
import { resumeConfirmingTakeOver } from './take-over-dialog';

const EVENTS_KEPT = 300;

export class SweepView implements View {
  readonly id = 'sweep' as const;
  readonly element: HTMLElement;
  private readonly buildsFailure = partFailureSlot('builds-failure');
  private readonly designsFailure = partFailureSlot('design-names-failure');
  private readonly buildSelect = h('select', { name: 'build', 'data-testid': 'sweep-build' });
  private readonly inputs = {
    kind: select([{ value: 'ac', label: 'AC frequency sweep' }, { value: 'dc', label: 'DC transfer sweep' }], 'ac', { name: 'kind' }),
    from: h('input', { type: 'text', name: 'from', value: String(SWEEP_RANGE_DEFAULTS.ac.from), 'data-testid': 'sweep-from' }),
    to: h('input', { type: 'text', name: 'to', value: String(SWEEP_RANGE_DEFAULTS.ac.to), 'data-testid': 'sweep-to' }),
    pointsPerDecade: h('input', { type: 'number', name: 'points-per-decade', value: String(SWEEP_RANGE_DEFAULTS.ac.pointsPerDecade), min: '1', max: '1000', 'data-testid': 'sweep-ppd' }),
    linearPoints: h('input', { type: 'number', name: 'points', value: String(SWEEP_RANGE_DEFAULTS.ac.linearPoints), min: '2', 'data-testid': 'sweep-points' }),
    spacing: select([{ value: 'log', label: 'log' }, { value: 'linear', label: 'linear' }], 'log', { name: 'spacing' }),
    amplitudeMode: select([{ value: 'auto', label: SETTINGS.automaticAmplitude.label }, { value: 'fixed', label: SETTINGS.fixedAmplitude.label }], 'auto', { name: 'amplitude-mode' }),
    fixedAmplitudeVpp: h('input', { type: 'text', name: 'amplitude', value: '', placeholder: 'e.g. 1', 'data-testid': 'sweep-amplitude' }),
    targetOutputVpp: h('input', { type: 'text', name: 'target-output', value: '', placeholder: 'as large as stays linear', 'data-testid': 'sweep-target-output' }),
    measurement: select([{ value: 'scope', label: 'scope (gain and phase)' }, { value: 'meter', label: 'meter (gain only)' }], 'scope', { name: 'measurement' }),
    minCycles: h('input', { type: 'number', name: 'min-cycles', value: String(SWEEP_DEFAULTS.minCycles), min: '1', 'data-testid': 'sweep-cycles' }),
    averages: h('input', { type: 'number', name: 'averages', value: String(SWEEP_DEFAULTS.averages), min: '1' }),
    refine: h('input', { type: 'checkbox', name: 'refine', checked: SWEEP_DEFAULTS.refine }),
    operator: h('input', { type: 'text', name: 'operator', autocomplete: 'name' }),
    notes: h('textarea', { name: 'notes', rows: '2' }),
  };
  /** Fields shown for one spacing or amplitude mode only; the labels are the table's (app/contract/vocabulary.ts), as the CLI's help. */
  private readonly shownWhen = {
    log: field(SETTINGS.pointsPerDecade.label, this.inputs.pointsPerDecade),
    linear: field(SETTINGS.linearPoints.label, this.inputs.linearPoints, `From start to end, evenly spaced (default ${SWEEP_RANGE_DEFAULTS.ac.linearPoints}).`),
    fixed: field(`${SETTINGS.fixedAmplitude.label} (${SETTINGS.fixedAmplitude.unit})`, this.inputs.fixedAmplitudeVpp, `Never above the ${SETTINGS.maxStimulus.label.toLowerCase()}.`),
    auto: field(`${SETTINGS.targetOutput.label} (${SETTINGS.targetOutput.unit}, optional)`, this.inputs.targetOutputVpp, `Empty: as large as stays linear. Never above the ${SETTINGS.maxStimulus.label.toLowerCase()}.`),
  };
  private readonly estimate = h('p', { className: 'estimate', 'data-testid': 'sweep-estimate', 'aria-live': 'polite' });
  private readonly buttons = {
    start: h('button', { type: 'button', className: 'primary', 'data-testid': 'sweep-start' }, 'Start'),
    pause: h('button', { type: 'button', 'data-testid': 'sweep-pause' }, 'Pause'),
    resume: h('button', { type: 'button', 'data-testid': 'sweep-resume' }, 'Resume'),
    stop: h('button', { type: 'button', className: 'danger', 'data-testid': 'sweep-stop' }, 'Stop'),
  };
  private readonly progress = h('progress', { max: '1', value: '0', 'aria-label': 'Sweep progress' });
  private readonly progressText = h('span', { className: 'progress-text', 'data-testid': 'sweep-progress' }, 'No run yet.');
  private readonly runHeader = h('p', { className: 'run-header', 'data-testid': 'run-header' });
  private readonly figures = h('dl', { className: 'figures', 'data-testid': 'run-figures' });
  private readonly events = h('ol', { className: 'events', 'aria-label': 'Run events', 'data-testid': 'run-events' });
  private readonly plotHost = h('div', { className: 'plot-host', 'data-testid': 'sweep-plot' });
  private plot: BodePlot | undefined;
  private noise: NoiseRunDisplay | undefined;
  private live: LivePoints | undefined;
  private run: RunSummary | undefined;
  private builds: BuildRecord[] = [];
  private readonly seenEvents = new Set<string>();
  private estimateSequence = 0;
  private readonly replan = debounce(() => void this.updateEstimate(), 250);

  constructor(
    private readonly client: RolloffClient,
    private readonly state: AppState,
  ) {
    const form = h(
      'form',
      { className: 'plan-form', 'aria-label': 'Sweep plan' },
      field('Build', this.buildSelect),
      this.buildsFailure,
      this.designsFailure,
      field('Kind', this.inputs.kind),
      field('From (Hz or V)', this.inputs.from, 'Engineering notation: 10, 1k, 2meg.'),
      field('To (Hz or V)', this.inputs.to),
      field('Spacing', this.inputs.spacing),
      this.shownWhen.log,
      this.shownWhen.linear,
      field('Stimulus amplitude', this.inputs.amplitudeMode, SETTINGS.automaticAmplitude.explanation),
      this.shownWhen.fixed,
      this.shownWhen.auto,
      field('Measure with', this.inputs.measurement),
      field('Minimum cycles', this.inputs.minCycles),
      field('Averages', this.inputs.averages),
      field(SETTINGS.refine.label, this.inputs.refine, `${asSentence(SETTINGS.refine.explanation)}`),
      field('Operator', this.inputs.operator),
      field('Notes', this.inputs.notes),
    );
    form.addEventListener('input', () => this.replan());
    form.addEventListener('change', () => {
      this.showChosenFields();
      this.replan();
    });
    this.showChosenFields();
    form.addEventListener('submit', (event) => event.preventDefault());
    // Switching AC ⇄ DC swaps the range to the other kind's defaults unless the user typed one of their own.
    let shownKind: SweepRequest['kind'] = 'ac';
    this.inputs.kind.addEventListener('change', () => {
      const next = this.inputs.kind.value as SweepRequest['kind'];
      const before = SWEEP_RANGE_DEFAULTS[shownKind];
      const after = SWEEP_RANGE_DEFAULTS[next];
      if (this.inputs.from.value === String(before.from) && this.inputs.to.value === String(before.to)) {
        this.inputs.from.value = String(after.from);
        this.inputs.to.value = String(after.to);
      }
      shownKind = next;
    });

    this.buttons.start.addEventListener('click', () => void guarded(this.buttons.start, 'Starting the sweep', () => this.start()));
    this.buttons.pause.addEventListener('click', () => void guarded(this.buttons.pause, 'Pausing', async () => this.applySummary(await client.pauseRun(this.run!.id))));
    this.buttons.resume.addEventListener('click', () => void guarded(this.buttons.resume, 'Resuming', async () => {
      const summary = await resumeConfirmingTakeOver(client, this.run!);
      if (summary) this.applySummary(summary);
    }));
    this.buttons.stop.addEventListener('click', () => void guarded(this.buttons.stop, 'Stopping', async () => this.applySummary(await client.stopRun(this.run!.id))));

    this.element = h(
      'section',
      { 'aria-labelledby': 'sweep-title' },
      h('h2', { id: 'sweep-title' }, 'Sweep'),
      h('div', { className: 'columns sweep-columns' },
        h('div', { className: 'panel' }, h('h3', {}, 'Plan'), form, this.estimate),
        h('div', { className: 'panel wide' },
          h('div', { className: 'run-controls' }, this.buttons.start, this.buttons.pause, this.buttons.resume, this.buttons.stop, this.progress, this.progressText),
          this.runHeader,
          this.plotHost,
          h('h3', {}, 'Figures'),
          this.figures,
          h('h3', {}, 'Events'),
          this.events,
        ),
      ),
    );
    this.renderButtons();

    client.on('point', (point) => {
      if (this.live?.add(point)) this.plot?.setMeasured(this.live);
    });
    client.on('progress', (progress) => this.applyProgress(progress));
    client.on('runEvent', (event) => {
      if (event.runId === this.run?.id) this.appendEvent(event.at, event.level, event.message);
    });
    state.subscribe((s, changed) => {
      if (changed.includes('build') && s.build) this.buildSelect.value = String(s.build.id);
      if (changed.includes('sweepRunId') && s.sweepRunId !== undefined && s.sweepRunId !== this.run?.id) void this.openRun(s.sweepRunId);
    });
  }

  async activate(): Promise<void> {
    if (!this.plot && !this.noise) this.replacePlot('ac');
    // The builds fill the list even when the designs (only their names) cannot be read; each failure is said beside the list.
    const [designList, buildList] = await Promise.allSettled([this.client.listDesigns(), this.client.listBuilds()]);
    showPartResult(this.buildsFailure, 'The builds', buildList);
    showPartResult(this.designsFailure, 'The design names', designList);
    if (buildList.status === 'rejected') return;
    const builds = buildList.value;
    this.builds = builds;
    const names = new Map(designList.status === 'fulfilled' ? designList.value.map((d) => [d.id, d.name]) : []);
    // Keep what the user picked here if it still exists; else the build made on the Design view; else the newest.
    const previous = Number(this.buildSelect.value);
    const chosen = builds.some((b) => b.id === previous) ? previous : this.state.current.build?.id ?? builds.at(-1)?.id;
    replaceChildren(this.buildSelect, builds.length === 0 ? h('option', { value: '' }, 'Create a build first (Design view)') : builds.map((b) => h('option', { value: String(b.id) }, `${names.get(b.designId) ?? 'design #' + b.designId} — ${b.label} (#${b.id})`)));
    if (chosen !== undefined) this.buildSelect.value = String(chosen);
    await this.updateEstimate();
  }

  /** After a reconnection: lists again, and the shown run from the store (points sent meanwhile were missed). */
  async resync(): Promise<void> {
    await this.activate();
    if (this.run) await this.openRun(this.run.id);
  }

  /** The request the form describes; throws ValidationError naming the field. */
  private request(): SweepRequest {
    const buildId = Number(this.buildSelect.value);
    if (!Number.isInteger(buildId) || buildId < 1) throw new UserError('No build picked for the sweep.', 'Create a build on the Design view (Alt+2), then pick it here.');
    const linear = this.inputs.spacing.value === 'linear';
    return {
      buildId,
      kind: this.inputs.kind.value as SweepRequest['kind'],
      from: parseEngineering(this.inputs.from.value, 'From'),
      to: parseEngineering(this.inputs.to.value, 'To'),
      pointsPerDecade: linear ? SWEEP_RANGE_DEFAULTS.ac.pointsPerDecade : Number(this.inputs.pointsPerDecade.value),
      spacing: linear ? 'linear' : 'log',
      ...(linear ? { points: Number(this.inputs.linearPoints.value) } : {}),
      amplitude: this.amplitude(),
      measurement: this.inputs.measurement.value as SweepRequest['measurement'],
      minCycles: Number(this.inputs.minCycles.value),
      averages: Number(this.inputs.averages.value),
      refine: this.inputs.refine.checked,
      operator: this.inputs.operator.value,
      notes: this.inputs.notes.value,
    };
  }

  /** The two amplitude settings of the CLI (--amplitude, --target-output), one field each. */
  private amplitude(): SweepRequest['amplitude'] {
    const { fixedAmplitude, targetOutput } = SETTINGS;
    if (this.inputs.amplitudeMode.value === 'fixed') {
      if (this.inputs.fixedAmplitudeVpp.value.trim() === '') throw new UserError(`${fixedAmplitude.label} is missing.`, `Give the stimulus in ${fixedAmplitude.unit}, or choose ${SETTINGS.automaticAmplitude.label.toLowerCase()}.`);
      return { mode: 'fixed', vpp: parseEngineering(this.inputs.fixedAmplitudeVpp.value, `${fixedAmplitude.label} (${fixedAmplitude.unit})`) };
    }
    const target = this.inputs.targetOutputVpp.value.trim();
    return target === '' ? { mode: 'auto' } : { mode: 'auto', targetOutputVpp: parseEngineering(target, `${targetOutput.label} (${targetOutput.unit})`) };
  }

  /** Only the fields that apply to the chosen spacing and amplitude mode are shown. */
  private showChosenFields(): void {
    const linear = this.inputs.spacing.value === 'linear';
    const fixed = this.inputs.amplitudeMode.value === 'fixed';
    this.shownWhen.log.hidden = linear;
    this.shownWhen.linear.hidden = !linear;
    this.shownWhen.fixed.hidden = !fixed;
    this.shownWhen.auto.hidden = fixed;
  }

  private async updateEstimate(): Promise<void> {
    if (this.builds.length === 0) {
      this.estimate.textContent = 'No build to sweep yet.';
      return;
    }
    // Only the answer to the latest form state counts; an earlier, slower answer is dropped.
    const sequence = ++this.estimateSequence;
    try {
      const plan = await this.client.planSweep(this.request());
      if (sequence !== this.estimateSequence) return;
      replaceChildren(this.estimate, `${plan.steps.length} points, about ${formatDuration(plan.estimatedDurationS)}.`, plan.warnings.length ? h('ul', { className: 'warnings' }, plan.warnings.map((w) => h('li', {}, w))) : null);
      this.estimate.classList.remove('invalid');
    } catch (error) {
      if (sequence !== this.estimateSequence) return;
      this.estimate.textContent = (error as Error).message;
      this.estimate.classList.add('invalid');
    }
  }

  private async start(): Promise<void> {
    const summary = await this.client.startRun(this.request());
    this.state.update({ sweepRunId: summary.id });
    await this.openRun(summary.id, summary);
  }

  /** Shows a run (new, live, or reopened from History) with what the store already has. */
  private async openRun(runId: number, summary?: RunSummary): Promise<void> {
    this.live = new LivePoints(runId);
    this.run = summary ?? this.run;
    this.events.textContent = '';
    this.seenEvents.clear();
    try {
      const kind = summary?.kind ?? (await this.client.getRunSummary(runId)).kind;
      if (kind === 'noise') {
        this.showNoiseDetail(await this.client.getNoiseRun(runId));
        return;
      }
      const detail = await this.client.getRun(runId);
      this.showDetail(detail);
    } catch (error) {
      showError(error, `Opening run #${runId}`);
    }
  }

  private showDetail(detail: RunDetail): void {
    if (!this.plot || this.plot.kind !== detail.kind) this.replacePlot(detail.kind);
    const stored = LivePoints.fromColumns(detail.id, detail.points);
    // Points that arrived by event while getRun was in flight are kept too (the buffer drops duplicates).
    if (this.live?.runId === detail.id) stored.addAll(this.live);
    this.live = stored;
    this.plot!.setTheory(detail.theory, { theoryGainLimitHz: detail.theoryGainLimitHz, theoryMinus3dbHz: detail.theoryMinus3dbHz });
    this.plot!.setMeasuredMarkers({ measuredGainLimitHz: detail.figures.gainLimitHz, measuredMinus3dbHz: detail.figures.minus3dbHz });
    this.plot!.setMeasured(this.live!);
    this.renderFigures(detail.figures, detail.verdict);
    if (detail.kind === 'dc') void this.showDcTheory(detail);
    for (const event of detail.events.slice(-EVENTS_KEPT)) this.appendEvent(event.at, event.level, event.message);
    this.applySummary(detail);
    // Refinement points come after the plan, so the stored run may hold more points than it planned.
    this.applyProgress({ runId: detail.id, step: detail.pointCount, total: Math.max(detail.plannedCount, detail.pointCount), etaS: NaN, status: detail.status });
  }

  private replacePlot(kind: RunDetail['kind']): void {
    this.noise?.destroy();
    this.noise = undefined;
    this.plot?.destroy();
    this.plot = new BodePlot(kind);
    replaceChildren(this.plotHost, this.plot.element);
  }

  private showNoiseDetail(detail: NoiseRunDetail): void {
    if (this.noise?.runId !== detail.id) {
      this.plot?.destroy();
      this.plot = undefined;
      this.noise?.destroy();
      this.noise = new NoiseRunDisplay(detail.id, () => this.client.getNoiseRun(detail.id), this.figures, (fresh) => this.applySummary(fresh));
      replaceChildren(this.plotHost, this.noise.plot.element);
    }
    this.noise.show(detail);
    for (const event of detail.events.slice(-EVENTS_KEPT)) this.appendEvent(event.at, event.level, event.message);
    this.applySummary(detail);
    this.applyProgress({ runId: detail.id, step: detail.pointCount, total: detail.plannedCount, etaS: NaN, status: detail.status });
  }

  private applySummary(summary: RunSummary): void {
    const previous = this.run?.status;
    this.run = summary;
    const state = runStateText(summary);
    replaceChildren(
      this.runHeader,
      `Run #${summary.id}: ${summary.designName} — ${summary.buildLabel} `,
      h('span', { className: `badge status-${shownStatus(summary)}`, 'data-testid': 'run-status' }, shownStatus(summary)),
      summary.simulated ? h('span', { className: 'badge simulated' }, 'simulated') : null,
      state ? h('small', { className: 'run-driver', 'data-testid': 'run-driver' }, state) : null,
    );
    this.renderButtons();
    if (previous !== summary.status && isFinished(summary.status) && previous !== undefined && !isFinished(previous)) void this.refreshFigures(summary.id);
  }

  private applyProgress(progress: RunProgress): void {
    if (progress.runId !== this.run?.id) return;
    if (this.noise?.runId === progress.runId && Number.isFinite(progress.etaS)) this.noise.recordArrived();
    this.progress.max = Math.max(1, progress.total);
    this.progress.value = Math.min(progress.step, progress.total);
    const eta = progress.status === 'running' && Number.isFinite(progress.etaS) ? `, about ${formatDuration(progress.etaS)} left` : '';
    if (this.run.kind === 'noise') {
      // A noise run's steps are records, none of them refinement: the same words, counted from the progress.
      this.progressText.textContent = `Records: ${pointCountText(progress.total, new Array<number>(Math.min(progress.step, progress.total)).fill(0))}${eta} (${progress.status})`;
    } else {
      // Counted from the points shown (each flagged planned or refinement), so the words match the plot.
      const flags = this.live?.runId === progress.runId ? this.live.flags : [];
      this.progressText.textContent = `Points: ${pointCountText(this.run.plannedCount, flags)}${eta} (${progress.status})`;
    }
    // A run that leaves the running state is given up by its driver (the store releases it).
    if (progress.status !== this.run.status) this.applySummary({ ...this.run, status: progress.status, pointCount: progress.step, owner: progress.status === 'running' ? this.run.owner : null });
  }

  /** After a run ends the service has the measured figures: show their markers. */
  private async refreshFigures(runId: number): Promise<void> {
    if (this.noise?.runId === runId) {
      this.noise.recordArrived();
      return;
    }
    try {
      const detail = await this.client.getRun(runId);
      if (detail.id !== this.run?.id) return;
      this.plot?.setMeasuredMarkers({ measuredGainLimitHz: detail.figures.gainLimitHz, measuredMinus3dbHz: detail.figures.minus3dbHz });
      this.renderFigures(detail.figures, detail.verdict);
    } catch (error) {
      showError(error, `Reading run #${runId}`);
    }
  }

  /** The log stage's DC transfer from the build's own part values, computed here with the pure circuit module. */
  private async showDcTheory(detail: RunDetail): Promise<void> {
    try {
      const [builds, designs] = await Promise.all([this.client.listBuilds(), this.client.listDesigns()]);
      const build = builds.find((b) => b.id === detail.buildId);
      const record = designs.find((d) => d.id === build?.designId);
      if (!build || !record) return;
      const design = withActualValues(parseDesign(record.design, record.name), build.actualValues);
      const low = Math.min(detail.request.from, detail.request.to);
      const high = Math.max(detail.request.from, detail.request.to);
      // Theory drawn four times denser than the sweep so the curve is smooth between points.
      const inputs = low > 0 ? logGrid(low, high, detail.request.pointsPerDecade * 4) : Float64Array.from({ length: 101 }, (_, i) => low + ((high - low) * i) / 100);
      const transfer = solveDcTransfer(design, inputs);
      if (this.run?.id === detail.id) this.plot?.setDcTheory(transfer.inputV, transfer.outputV);
    } catch (error) {
      showError(error, 'Computing the DC theory');
    }
  }

  private renderFigures(figures: RunFigures, verdict: Verdict | null): void {
    const rows = figureRows(figures);
    if (verdict) rows.push(['Verdict', `${verdict.pass ? 'pass' : 'fail'}${verdict.reasons.length ? ' — ' + verdict.reasons.join('; ') : ''}`]);
    replaceChildren(this.figures, rows.length === 0 ? h('p', { className: 'empty' }, 'Figures appear when the run has enough points.') : rows.flatMap(([term, value]) => [h('dt', {}, term), h('dd', {}, value)]));
  }

  private renderButtons(): void {
    const status: RunStatus | undefined = this.run?.status;
    this.buttons.pause.disabled = status !== 'running';
    const resumable = status === 'paused' || status === 'stopped' || status === 'failed' || (this.run !== undefined && shownStatus(this.run) === 'interrupted');
    this.buttons.resume.disabled = !resumable || this.run!.pointCount >= this.run!.plannedCount;
    this.buttons.stop.disabled = !(status === 'running' || status === 'paused');
    this.buttons.start.disabled = status === 'running';
  }

  private appendEvent(at: string, level: string, message: string): void {
    // The same event can come twice: by event while getRun is in flight, and in getRun's list.
    const key = `${at}|${message}`;
    if (this.seenEvents.has(key)) return;
    this.seenEvents.add(key);
    this.events.appendChild(h('li', { className: `event-${level}` }, h('time', {}, at.slice(11, 19)), ` ${message}`));
    while (this.events.childElementCount > EVENTS_KEPT) this.events.firstElementChild?.remove();
    this.events.scrollTop = this.events.scrollHeight;
  }
}

function isFinished(status: RunStatus): boolean {
  return status === 'done' || status === 'stopped' || status === 'failed';
}
