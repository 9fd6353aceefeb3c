/**
 * Design: start from a template, a design file or a saved design; edit part
 * values and the op-amp model; the theoretical gain and phase, tolerance band,
 * gain-limit and −3 dB frequencies update as you type. Theory is computed here in
 * the window with the pure circuit module — no round trip to the service.
 */
import { UserError } from '../../app/errors';
import type { BuildRecord, DesignRecord, RolloffClient, TemplateInfo, TheoryColumns } from '../../app/contract/contract';
import { logGrid, parseEngineering, formatEngineering, formatFixed, formatInUnit } from '../../app/units';
import { analyzeStability, monteCarloAc, parseDesign, solveAc, stabilityWarnings, summarizeAc, templateParameterText, TOLERANCE_BAND_SETTINGS } from '../../app/circuit';
import { debounce, field, h, replaceChildren } from '../dom';
import { formatDb, formatHz } from '../model/format';
import { guarded, partFailureSlot, showError, showInfo, showPartResult } from '../notices';
import { BodePlot } from '../plot/bode-plot';
import type { View } from '../shell';
import type { AppState } from '../state';
import { DIODE_MODEL_PARAMETERS, FIGURE_NAMES, OPAMP_MODEL_PARAMETERS, type ModelParameterName } from '../../app/contract/vocabulary';

/** The display range of the Design view's theory plot: wide enough for audio and instrumentation stages. */
const THEORY_FROM_HZ = 1;
const THEORY_TO_HZ = 10e6;
const THEORY_POINTS_PER_DECADE = 30;

type DraftPart = Record<string, unknown> & { id: string; type: string; nodes: string[] };
type Draft = Record<string, unknown> & { name: string; parts: DraftPart[] };

/** The op-amp model fields edited here; names, units and the V/µs of the slew rate from the one table. */
const OPAMP_FIELDS = OPAMP_MODEL_PARAMETERS.filter((p) => ['openLoopGain', 'gbw', 'slewRate'].includes(p.key));
const DIODE_FIELDS = DIODE_MODEL_PARAMETERS;

export class DesignView implements View {
  readonly id = 'design' as const;
  readonly element: HTMLElement;
  private readonly templatesFailure = partFailureSlot('templates-failure');
  private readonly designsFailure = partFailureSlot('saved-designs-failure');
  private readonly templateSelect = h('select', { name: 'template', 'data-testid': 'template' });
  private readonly templateParams = h('div', { className: 'param-grid' });
  private readonly savedSelect = h('select', { name: 'saved-design', 'data-testid': 'saved-design' });
  private readonly nameInput = h('input', { type: 'text', name: 'design-name', 'data-testid': 'design-name' });
  private readonly partsHost = h('div', { className: 'parts' });
  private readonly figures = h('dl', { className: 'figures', 'data-testid': 'design-figures' });
  private readonly theoryError = h('p', { className: 'inline-error', role: 'alert', hidden: true });
  private readonly buildLabel = h('input', { type: 'text', name: 'build-label', 'data-testid': 'build-label', placeholder: 'e.g. board A, first assembly' });
  private readonly buildNotes = h('textarea', { name: 'build-notes', rows: '2' });
  private readonly actualHost = h('div', { className: 'param-grid' });
  private readonly savedState = h('p', { className: 'saved-state', 'data-testid': 'design-saved-state' });
  private readonly plotHost = h('div', { className: 'plot-host' });
  private plot: BodePlot | undefined;
  private templates: TemplateInfo[] = [];
  private draft: Draft | undefined;
  private readonly recompute = debounce(() => this.computeTheory(), 120);

  constructor(
    private readonly client: RolloffClient,
    private readonly state: AppState,
  ) {
    const makeButton = h('button', { type: 'button', 'data-testid': 'make-template' }, 'Use template');
    makeButton.addEventListener('click', () => void guarded(makeButton, 'Making the design', () => this.makeFromTemplate()));
    this.templateSelect.addEventListener('change', () => this.renderTemplateParams());

    const loadButton = h('button', { type: 'button' }, 'Open');
    loadButton.addEventListener('click', () => void guarded(loadButton, 'Opening the design', async () => {
      const designs = await client.listDesigns();
      const record = designs.find((d) => String(d.id) === this.savedSelect.value);
      if (record) this.loadDraft(record.design, record);
    }));

    const fileInput = h('input', { type: 'file', accept: '.json,application/json', 'aria-label': 'Open a design file' });
    fileInput.addEventListener('change', () => void this.openFile(fileInput));

    const saveButton = h('button', { type: 'button', className: 'primary', 'data-testid': 'save-design' }, 'Save design');
    saveButton.addEventListener('click', () => void guarded(saveButton, 'Saving the design', () => this.save()));
    this.nameInput.addEventListener('input', () => {
      if (this.draft) this.draft.name = this.nameInput.value;
      this.markUnsaved();
    });

    const buildButton = h('button', { type: 'button', className: 'primary', 'data-testid': 'create-build' }, 'Create build');
    buildButton.addEventListener('click', () => void guarded(buildButton, 'Creating the build', () => this.createBuild()));

    this.element = h(
      'section',
      { 'aria-labelledby': 'design-title' },
      h('h2', { id: 'design-title' }, 'Design'),
      h('div', { className: 'start-row' },
        h('div', { className: 'panel' }, h('h3', {}, 'From a template'), field('Template', this.templateSelect), this.templatesFailure, this.templateParams, makeButton),
        h('div', { className: 'panel' }, h('h3', {}, 'A saved design'), field('Saved design', this.savedSelect), this.designsFailure, loadButton),
        h('div', { className: 'panel' }, h('h3', {}, 'A design file'), field('Design file (JSON)', fileInput)),
      ),
      h('div', { className: 'columns design-columns' },
        h('div', { className: 'panel' },
          h('h3', {}, 'Parts'),
          field('Name', this.nameInput),
          this.partsHost,
          h('div', { className: 'actions' }, saveButton, this.savedState),
          h('h3', {}, 'Build'),
          h('p', { className: 'hint' }, 'A build is one physical board of this design. Enter measured part values where you have them.'),
          field('Label', this.buildLabel),
          field('Notes', this.buildNotes),
          this.actualHost,
          buildButton,
        ),
        h('div', { className: 'panel wide sticky' }, h('h3', {}, 'Theory'), this.theoryError, this.figures, this.plotHost),
      ),
    );
  }

  async activate(): Promise<void> {
    if (!this.plot) {
      this.plot = new BodePlot('ac');
      this.plotHost.appendChild(this.plot.element);
    }
    // Each list on its own: a failing one says so beside its control, the other still fills in.
    const [templates, saved] = await Promise.allSettled([this.templates.length ? Promise.resolve(this.templates) : this.client.listTemplates(), this.client.listDesigns()]);
    showPartResult(this.templatesFailure, 'The templates', templates);
    showPartResult(this.designsFailure, 'The saved designs', saved);
    if (this.templates.length === 0 && templates.status === 'fulfilled') {
      this.templates = templates.value;
      replaceChildren(this.templateSelect, this.templates.map((t) => h('option', { value: t.id }, t.title)));
      this.renderTemplateParams();
    }
    if (saved.status === 'rejected') return;
    const designs = saved.value;
    replaceChildren(this.savedSelect, designs.length === 0 ? h('option', { value: '' }, 'none saved yet') : designs.map((d) => h('option', { value: String(d.id) }, `${d.name} (#${d.id})`)));
    if (this.state.current.design) this.savedSelect.value = String(this.state.current.design.id);
    if (!this.draft && designs.length > 0) {
      const record = this.state.current.design ?? designs[designs.length - 1];
      this.loadDraft(record.design, record);
    }
  }

  private renderTemplateParams(): void {
    const template = this.templates.find((t) => t.id === this.templateSelect.value);
    replaceChildren(
      this.templateParams,
      (template?.parameters ?? []).map((p) =>
        field(`${p.name}${p.unit ? ` (${p.unit})` : ''}`, h('input', { type: 'text', name: `template-${p.name}`, 'data-param': p.name, value: templateParameterText(p.defaultValue, p.unit), title: p.description }), p.description),
      ),
    );
    if (template) this.templateParams.prepend(h('p', { className: 'hint' }, template.description));
  }

  private async makeFromTemplate(): Promise<void> {
    const parameters: Record<string, number> = {};
    for (const input of this.templateParams.querySelectorAll<HTMLInputElement>('input[data-param]')) {
      parameters[input.dataset.param!] = parseEngineering(input.value, input.dataset.param);
    }
    const design = await this.client.makeTemplate(this.templateSelect.value, parameters);
    this.loadDraft(design, undefined);
  }

  private async openFile(input: HTMLInputElement): Promise<void> {
    const file = input.files?.[0];
    if (!file) return;
    try {
      const json = JSON.parse(await file.text());
      parseDesign(json, file.name);
      this.loadDraft(json, undefined);
    } catch (error) {
      showError(error, `Opening ${file.name}`);
    } finally {
      input.value = '';
    }
  }

  private loadDraft(design: unknown, record: DesignRecord | undefined): void {
    this.draft = structuredClone(design) as Draft;
    this.nameInput.value = this.draft.name ?? '';
    if (record) {
      this.state.update({ design: record });
      this.markSaved(record);
    } else this.markUnsaved();
    this.renderParts();
    this.computeTheory();
  }

  /** True while the draft differs from the design last saved or opened from the store. */
  private unsaved = true;

  private markSaved(record: DesignRecord): void {
    this.unsaved = false;
    this.savedState.textContent = `Saved as #${record.id}.`;
  }

  private markUnsaved(): void {
    this.unsaved = true;
    this.savedState.textContent = 'Not saved yet.';
  }

  private renderParts(): void {
    const draft = this.draft;
    if (!draft) return;
    const rows = draft.parts.map((part) => {
      const title = h('th', { scope: 'row' }, part.id, h('small', {}, ` ${part.type} ${part.nodes.join('–')}`));
      if (part.type === 'resistor' || part.type === 'capacitor' || part.type === 'inductor') {
        const unit = part.type === 'resistor' ? 'Ω' : part.type === 'capacitor' ? 'F' : 'H';
        const value = this.numberInput(String(typeof part.value === 'number' ? formatEngineering(part.value, '', 6).replace(' ', '') : part.value), `${part.id} value (${unit})`, (text) => (part.value = text));
        const tolerance = this.numberInput(part.tolerance === undefined ? '' : String(Number(part.tolerance) * 100), `${part.id} tolerance (%)`, (text) => {
          if (text.trim() === '') delete part.tolerance;
          else part.tolerance = parseEngineering(text, `${part.id} tolerance`) / 100;
        });
        return h('tr', {}, title, h('td', {}, value), h('td', {}, tolerance));
      }
      const model = (part.model ?? {}) as Record<string, unknown>;
      const fields = part.type === 'opamp' ? OPAMP_FIELDS : DIODE_FIELDS;
      // A field in the trade's unit (slew rate in V/µs) shows and takes that unit; the file keeps SI.
      const shown = (f: ModelParameterName, value: number) => (f.perSi !== undefined ? formatInUnit(value, f.perSi, '', 6) : formatEngineering(value, '', 6).replace(' ', ''));
      const inputs = fields.map((f) =>
        field(`${f.label}${f.unit ? ` (${f.unit})` : ''}`, this.numberInput(model[f.key] === undefined ? '' : shown(f, Number(model[f.key])), `${part.id} ${f.label}`, (text) => {
          if (text.trim() === '') delete model[f.key];
          else model[f.key] = parseEngineering(text, `${part.id} ${f.label} (${f.unit})`) / (f.perSi ?? 1);
        })),
      );
      if (part.type === 'opamp') {
        const rails = (model.rails as [number, number] | undefined) ?? undefined;
        inputs.push(field('Output rails low/high (V)', this.numberInput(rails ? `${rails[0]}, ${rails[1]}` : '', `${part.id} rails`, (text) => {
          if (text.trim() === '') delete model.rails;
          else {
            const [low, high] = text.split(',').map((t) => parseEngineering(t.trim(), `${part.id} rails`));
            model.rails = [low, high];
          }
        })));
      }
      return h('tr', {}, title, h('td', { colspan: '2' }, h('div', { className: 'param-grid' }, inputs)));
    });
    replaceChildren(
      this.partsHost,
      h('table', { className: 'data-table parts-table' }, h('thead', {}, h('tr', {}, h('th', { scope: 'col' }, 'Part'), h('th', { scope: 'col' }, 'Value'), h('th', { scope: 'col' }, 'Tolerance %'))), h('tbody', {}, rows)),
    );
    replaceChildren(
      this.actualHost,
      draft.parts
        .filter((p) => p.type === 'resistor' || p.type === 'capacitor' || p.type === 'inductor')
        .map((p) => field(`Measured ${p.id}`, h('input', { type: 'text', 'data-actual': p.id, placeholder: 'as designed' }))),
    );
  }

  /** An input whose text is applied to the draft as you type; a bad value is shown beside it and not applied. */
  private numberInput(value: string, label: string, apply: (text: string) => void): HTMLInputElement {
    const input = h('input', { type: 'text', value, 'aria-label': label, 'data-part-input': label, autocomplete: 'off', spellcheck: 'false' });
    input.addEventListener('input', () => {
      try {
        apply(input.value);
        input.removeAttribute('aria-invalid');
        input.title = '';
        this.markUnsaved();
        this.recompute();
      } catch (error) {
        input.setAttribute('aria-invalid', 'true');
        input.title = (error as Error).message;
      }
    });
    return input;
  }

  private computeTheory(): void {
    if (!this.draft || !this.plot) return;
    try {
      const design = parseDesign(this.draft, 'Design view');
      const frequencies = logGrid(THEORY_FROM_HZ, THEORY_TO_HZ, THEORY_POINTS_PER_DECADE);
      const response = solveAc(design, frequencies);
      const summary = summarizeAc(design, response);
      const hasTolerances = design.parts.some((p) => 'tolerance' in p && p.tolerance !== undefined && p.tolerance > 0);
      const band = hasTolerances ? monteCarloAc(design, frequencies, { ...TOLERANCE_BAND_SETTINGS, distribution: 'uniform' }) : undefined;
      const theory: TheoryColumns = {
        frequencyHz: Array.from(response.frequencyHz),
        gainDb: Array.from(response.gainDb),
        phaseDeg: Array.from(response.phaseDeg),
        idealGainDb: Array.from(response.idealGainDb),
        idealPhaseDeg: Array.from(response.idealPhaseDeg),
        bandLowDb: band ? Array.from(band.gainLowDb) : undefined,
        bandHighDb: band ? Array.from(band.gainHighDb) : undefined,
      };
      this.plot.setTheory(theory, { theoryGainLimitHz: summary.gainLimitHz, theoryMinus3dbHz: summary.minus3dbHz });
      this.theoryError.hidden = true;
      const stability = analyzeStability(design);
      const margins = stability
        .filter((s) => s.phaseMarginDeg !== undefined)
        .map((s) => `${s.id}: ${formatFixed(s.phaseMarginDeg!, 1)}° (${FIGURE_NAMES.closedLoopPeakingDb.toLowerCase()} ${formatFixed(s.peakingDb, 2)} dB)`);
      const warnings = stabilityWarnings(stability);
      replaceChildren(
        this.figures,
        h('dt', {}, FIGURE_NAMES.passbandGainDb), h('dd', { 'data-figure': 'passband' }, formatDb(summary.passbandGainDb)),
        h('dt', {}, FIGURE_NAMES.minus3dbHz), h('dd', { 'data-figure': 'minus3db' }, summary.minus3dbHz.length ? summary.minus3dbHz.map((f) => formatHz(f)).join(', ') : 'none in range'),
        h('dt', {}, FIGURE_NAMES.gainLimitHz), h('dd', { 'data-figure': 'gain-limit' }, formatHz(summary.gainLimitHz)),
        h('dt', {}, FIGURE_NAMES.rolloffDbPerDecade), h('dd', {}, summary.rolloffDbPerDecade === undefined ? '—' : `${formatFixed(summary.rolloffDbPerDecade, 1)} dB/decade`),
        h('dt', {}, 'Tolerance band'), h('dd', {}, hasTolerances ? `2.5–97.5 % of ${TOLERANCE_BAND_SETTINGS.samples} Monte Carlo samples` : 'no part tolerances given'),
        h('dt', {}, FIGURE_NAMES.phaseMarginDeg), h('dd', { 'data-figure': 'phase-margin' }, margins.length ? margins.join('; ') : 'no loop-gain crossover (ideal op-amp)'),
        ...warnings.map((w) => h('dd', { className: 'inline-warning', role: 'alert', 'data-warning': w.kind }, w.message)),
      );
    } catch (error) {
      this.theoryError.hidden = false;
      this.theoryError.textContent = (error as Error).message;
    }
  }

  private async save(): Promise<void> {
    if (!this.draft) throw new UserError('There is no design to save yet.', 'Pick a template, a saved design or a design file first.');
    parseDesign(this.draft, 'Design view');
    const record = await this.client.saveDesign(this.draft);
    this.state.update({ design: record });
    this.markSaved(record);
    showInfo(`Design "${record.name}" saved.`);
  }

  private async createBuild(): Promise<BuildRecord> {
    const design = this.state.current.design;
    // A build belongs to a stored design: save edits first so the build matches what is on screen.
    if (!design || this.unsaved) await this.save();
    const designId = this.state.current.design!.id;
    const actualValues: Record<string, number> = {};
    for (const input of this.actualHost.querySelectorAll<HTMLInputElement>('input[data-actual]')) {
      if (input.value.trim() !== '') actualValues[input.dataset.actual!] = parseEngineering(input.value, `Measured ${input.dataset.actual}`);
    }
    const build = await this.client.createBuild({ designId, label: this.buildLabel.value.trim() || `build ${new Date().toISOString().slice(0, 16)}`, notes: this.buildNotes.value, actualValues });
    this.state.update({ build });
    showInfo(`Build "${build.label}" created for design #${designId}.`);
    return build;
  }
}



