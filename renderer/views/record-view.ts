/** Record: export the picked runs as PDF, HTML, CSV or JSON and download the file. */
import type { RecordFormat, RolloffClient } from '../../app/service/contract';
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
      h('div', { className: 'panel' }, this.picked, pickButton, field('Format', this.format), exportButton, this.result),
    );
  }

  activate(): void {
    const ids = this.state.current.pickedRunIds;
    const sweepRun = this.state.current.sweepRunId;
    replaceChildren(this.picked, ids.length > 0 ? `Runs: ${ids.map((id) => '#' + id).join(', ')}` : sweepRun !== undefined ? `Run #${sweepRun} (from the Sweep view)` : 'No run picked yet.');
  }

  private async export(): Promise<void> {
    const ids = this.state.current.pickedRunIds.length > 0 ? this.state.current.pickedRunIds : this.state.current.sweepRunId !== undefined ? [this.state.current.sweepRunId] : [];
    if (ids.length === 0) throw new Error('Pick one or more runs in History first.');
    const record = await this.client.exportRecord(ids, this.format.value as RecordFormat);
    const bytes = record.encoding === 'base64' ? Uint8Array.from(atob(record.content), (c) => c.charCodeAt(0)) : new TextEncoder().encode(record.content);
    const url = URL.createObjectURL(new Blob([bytes], { type: record.mimeType }));
    const link = h('a', { href: url, download: record.fileName, 'data-testid': 'record-download' }, `Download ${record.fileName} (${Math.ceil(bytes.length / 1024)} kB)`);
    replaceChildren(this.result, link);
    link.click();
    showInfo(`Record ${record.fileName} ready.`);
  }
}
