/** Record: export the picked runs as PDF, HTML, CSV or JSON and download the file. */
import { UserError } from '../../app/errors';
import type { RecordFormat, RolloffClient } from '../../app/contract/contract';
import { field, h, replaceChildren, select } from '../dom';
import { guarded, showInfo } from '../notices';
import type { View } from '../shell';
import type { AppState } from '../state';

export class RecordView implements View {
  readonly id = 'record' as const;
  readonly element: HTMLElement;
  private readonly format = select(
    [
      { value: 'pdf', label: 'PDF (vector plots, for printing)' },
      { value: 'html', label: 'HTML (one self-contained file)' },
      { value: 'csv', label: 'CSV (points table)' },
      { value: 'json', label: 'JSON (everything, machine-readable)' },
    ],
    'pdf',
    { name: 'format', 'data-testid': 'record-format' },
  );
  private readonly picked = h('p', { 'data-testid': 'record-picked' });
  private readonly runsBody = h('tbody');
  private readonly result = h('p', { className: 'record-result', 'data-testid': 'record-result' });

  constructor(
    private readonly client: RolloffClient,
    private readonly state: AppState,
  ) {
    const exportButton = h('button', { type: 'button', className: 'primary', 'data-testid': 'record-export' }, 'Export');
    exportButton.addEventListener('click', () => void guarded(exportButton, 'Exporting the record', () => this.export()));
    const pickButton = h('button', { type: 'button' }, 'Pick runs in History');
    pickButton.addEventListener('click', () => state.showView('history'));
    this.element = h(
      'section',
      { 'aria-labelledby': 'record-title' },
      h('h2', { id: 'record-title' }, 'Record'),
      h('div', { className: 'columns' },
        h('div', { className: 'panel stack-form' },
          h('h3', {}, 'Export'),
          field('Format', this.format),
          h('p', { className: 'hint' }, 'One run gives a run record; several runs give a comparison record against theory. Every record carries the design, the build, the bench identities, the points with their uncertainties, the figures, the safety notice and a digest of the data.'),
          exportButton,
          this.result,
        ),
        h('div', { className: 'panel' },
          h('h3', {}, 'Runs in the record'),
          this.picked,
          h('table', { className: 'data-table' }, h('thead', {}, h('tr', {}, ['Run', 'Design', 'Build', 'Kind', 'Status', 'Points'].map((t) => h('th', { scope: 'col' }, t)))), this.runsBody),
          pickButton,
        ),
      ),
    );
  }

  async activate(): Promise<void> {
    const ids = this.runIds();
    const fromSweep = this.state.current.pickedRunIds.length === 0 && ids.length > 0;
    replaceChildren(this.picked, ids.length === 0 ? 'No run picked yet.' : fromSweep ? 'The run on the Sweep view:' : `${ids.length} run${ids.length === 1 ? '' : 's'} picked in History:`);
    const runs = ids.length === 0 ? [] : await this.client.listRuns();
    replaceChildren(
      this.runsBody,
      ids.map((id) => {
        const run = runs.find((r) => r.id === id);
        return h('tr', {}, h('th', { scope: 'row' }, `#${id}`), h('td', {}, run?.designName ?? '—'), h('td', {}, run?.buildLabel ?? '—'), h('td', {}, run?.kind.toUpperCase() ?? '—'),
          h('td', {}, run ? h('span', { className: `badge status-${run.status}` }, run.status) : '—', run?.simulated ? h('span', { className: 'badge simulated' }, 'simulated') : null),
          h('td', {}, run ? `${run.pointCount}` : '—'));
      }),
    );
  }

  /** The picked runs, else the run shown on the Sweep view. */
  private runIds(): number[] {
    const { pickedRunIds, sweepRunId } = this.state.current;
    return pickedRunIds.length > 0 ? pickedRunIds : sweepRunId !== undefined ? [sweepRunId] : [];
  }

  private async export(): Promise<void> {
    const ids = this.runIds();
    if (ids.length === 0) throw new UserError('No run picked for the record.', 'Tick one or more runs in History (Alt+4), or open a run on the Sweep view.');
    const record = await this.client.exportRecord(ids, this.format.value as RecordFormat);
    const bytes = record.encoding === 'base64' ? Uint8Array.from(atob(record.content), (c) => c.charCodeAt(0)) : new TextEncoder().encode(record.content);
    const url = URL.createObjectURL(new Blob([bytes], { type: record.mimeType }));
    const link = h('a', { href: url, download: record.fileName, 'data-testid': 'record-download' }, `Download ${record.fileName} (${Math.ceil(bytes.length / 1024)} kB)`);
    replaceChildren(this.result, link);
    link.click();
    showInfo(`Record ${record.fileName} ready.`);
  }
}
