/**
 * Bench: connect instruments by address or from the port list, see their
 * identities, set the maximum stimulus and start the simulated bench
 * (always labelled simulated), watch the SCPI traffic, and see or change the
 * store the window works on (store-panel.ts).
 */
import { INSTRUMENT_ROLES as ROLES, type BenchStatus, type DesignRecord, type InstrumentRole, type ProfileCheckReport, type ProfileSummary, type RolloffClient, type TrafficLine } from '../../app/contract/contract';
import { parseEngineering } from '../../app/units';
import { UserError } from '../../app/errors';
import { field, h, replaceChildren, select } from '../dom';
import { guarded, partFailureSlot, showInfo, showPartResult } from '../notices';
import type { View } from '../shell';
import type { AppState } from '../state';
import { SETTINGS } from '../../app/contract/vocabulary';
import { asSentence } from '../model/format';
import { benchDescription, limitSourceText } from '../../app/contract/bench-text';
import { StorePanel } from './store-panel';

/** Enough scroll-back to see a sweep's recent exchanges without the page growing without bound. */
const TRAFFIC_LINES_KEPT = 400;

export class BenchView implements View {
  readonly id = 'bench' as const;
  readonly element: HTMLElement;
  private readonly instrumentsBody = h('tbody');
  private readonly roleSelect = select(ROLES.map((r) => ({ value: r, label: r })), 'generator', { name: 'role' });
  private readonly addressInput = h('input', { type: 'text', name: 'address', list: 'port-list', autocomplete: 'off', placeholder: 'serial device path, host:port or resource string' });
  private readonly portList = h('datalist', { id: 'port-list' });
  private readonly profileSelect = h('select', { name: 'profile' });
  private readonly maxInput = h('input', { type: 'text', name: 'max-stimulus', inputmode: 'decimal', 'data-testid': 'max-stimulus' });
  /** Whose limit is in force and when it was set ("reusing the limit of 2 Vpp set on … for bench …"). */
  private readonly maxSource = h('p', { className: 'hint', 'data-testid': 'max-stimulus-source', 'aria-live': 'polite' });
  private readonly simulatedDesignSelect = h('select', { name: 'simulated-design', 'data-testid': 'simulated-design' });
  private readonly simulatedStatus = h('p', { className: 'simulated-status', 'data-testid': 'simulated-status' });
  private readonly checkTitle = h('p', { 'data-testid': 'profile-check-title' }, 'Check a profile against an instrument: pick the role, address and profile above and press Check profile.');
  private readonly checkBody = h('tbody', { 'data-testid': 'profile-check' });
  private readonly traffic = h('ol', { className: 'traffic', 'aria-label': 'Instrument traffic', 'data-testid': 'traffic' });
  private profiles: ProfileSummary[] = [];
  /** One slot per thing the view loads: what failed is said beside it, the rest still works. */
  private readonly portsNote = h('p', { className: 'hint', 'data-testid': 'ports-note', hidden: true });
  private readonly portsFailure = partFailureSlot('ports-failure');
  private readonly profilesFailure = partFailureSlot('profiles-failure');
  private readonly designsFailure = partFailureSlot('designs-failure');
  private readonly storePanel: StorePanel;
  private readonly storeFailure = partFailureSlot('store-failure');

  constructor(
    private readonly client: RolloffClient,
    private readonly state: AppState,
  ) {
    this.storePanel = new StorePanel(client, state);
    const connectButton = h('button', { type: 'submit', className: 'primary' }, 'Connect');
    const checkButton = h('button', { type: 'button', 'data-testid': 'check-profile' }, 'Check profile');
    checkButton.addEventListener('click', () => {
      void guarded(checkButton, 'Checking the profile', async () => {
        const report = await client.checkProfile({ address: this.addressInput.value, profileId: this.profileSelect.value });
        this.renderCheck(report);
        const notAccepted = report.checks.filter((c) => c.outcome !== 'accepted').length;
        showInfo(notAccepted === 0 ? `Profile ${report.profileId}: every operation accepted.` : `Profile ${report.profileId}: ${notAccepted} of ${report.checks.length} operations not accepted — see the table.`);
      });
    });
    const connectForm = h(
      'form',
      { className: 'stack-form', 'aria-label': 'Connect an instrument' },
      field('Role', this.roleSelect),
      field('Address', this.addressInput, 'Pick a port from the list or type an address.'),
      this.portsNote,
      this.portsFailure,
      field('Profile', this.profileSelect),
      this.profilesFailure,
      h('div', { className: 'button-row' }, connectButton, checkButton),
      this.portList,
    );
    this.roleSelect.addEventListener('change', () => this.renderProfiles());
    connectForm.addEventListener('submit', (event) => {
      event.preventDefault();
      void guarded(connectButton, 'Connecting', async () => {
        const info = await client.connect({ role: this.roleSelect.value as InstrumentRole, address: this.addressInput.value, profileId: this.profileSelect.value });
        showInfo(`Connected ${info.role}: ${info.identity.manufacturer} ${info.identity.model}`);
        await this.refreshBench();
      });
    });

    const maxButton = h('button', { type: 'submit' }, 'Apply');
    const maxForm = h('form', { className: 'stack-form', 'aria-label': SETTINGS.maxStimulus.label }, field(`${SETTINGS.maxStimulus.label} (${SETTINGS.maxStimulus.unit})`, this.maxInput, `${asSentence(SETTINGS.maxStimulus.explanation)} Engineering notation works: 500m, 2.`), maxButton);
    maxForm.addEventListener('submit', (event) => {
      event.preventDefault();
      void guarded(maxButton, 'Setting the maximum stimulus', async () => {
        const bench = await client.setMaxStimulus(parseEngineering(this.maxInput.value, 'Maximum stimulus'));
        state.update({ bench });
        showInfo(`Maximum stimulus set to ${bench.maxStimulusVpp} Vpp${bench.bench ? ` for ${benchDescription(bench.bench)}` : ''}.`);
      });
    });

    const simulatedButton = h('button', { type: 'submit', 'data-testid': 'start-simulated' }, 'Start the simulated bench');
    const simulatedForm = h('form', { className: 'stack-form', 'aria-label': 'Simulated bench' }, field('Simulated circuit', this.simulatedDesignSelect, 'The simulated bench answers SCPI like real instruments; its readings are computed, not measured.'), this.designsFailure, simulatedButton);
    simulatedForm.addEventListener('submit', (event) => {
      event.preventDefault();
      void guarded(simulatedButton, 'Starting the simulated bench', async () => {
        const designId = Number(this.simulatedDesignSelect.value);
        if (!(designId >= 1)) throw new UserError('No design picked for the simulated bench.', 'Save a design on the Design view (Alt+2), then pick it here.');
        const bench = await client.startSimulatedBench(designId);
        state.update({ bench });
        showInfo('Simulated bench started — simulated instruments.');
      });
    });

    const clearTraffic = h('button', { type: 'button', className: 'small' }, 'Clear');
    clearTraffic.addEventListener('click', () => (this.traffic.textContent = ''));

    this.element = h(
      'section',
      { 'aria-labelledby': 'bench-title' },
      h('h2', { id: 'bench-title' }, 'Bench'),
      h('div', { className: 'panel' },
        h('h3', {}, 'Instruments'),
        h('table', { className: 'data-table', 'data-testid': 'instruments' }, h('thead', {}, h('tr', {}, ['Role', 'Address', 'Profile', 'Identity', ''].map((t) => h('th', { scope: 'col' }, t)))), this.instrumentsBody),
      ),
      h('div', { className: 'start-row' },
        h('div', { className: 'panel' }, h('h3', {}, 'Connect'), connectForm),
        h('div', { className: 'panel' }, h('h3', {}, SETTINGS.maxStimulus.label), maxForm, this.maxSource),
        h('div', { className: 'panel' }, h('h3', {}, 'Simulated bench ', h('span', { className: 'badge simulated' }, 'simulated')), simulatedForm, this.simulatedStatus),
      ),
      h('div', { className: 'panel' },
        h('h3', {}, 'Profile check'),
        this.checkTitle,
        h('table', { className: 'data-table' }, h('thead', {}, h('tr', {}, ['Operation', 'Outcome', 'Instrument said / received', 'Reply', 'Commands sent'].map((t) => h('th', { scope: 'col' }, t)))), this.checkBody),
      ),
      h('div', { className: 'panel' }, h('h3', {}, 'Traffic ', clearTraffic), this.traffic),
      this.storeFailure,
      this.storePanel.element,
    );

    client.on('traffic', (line) => this.appendTraffic(line));
    state.subscribe((s, changed) => {
      if (changed.includes('bench')) this.renderBench(s.bench);
      if (changed.includes('design') && s.design) this.simulatedDesignSelect.value = String(s.design.id);
    });
  }

  async activate(): Promise<void> {
    const [ports, profiles, designs, store] = await Promise.allSettled([this.client.listPorts(), this.client.listProfiles(), this.client.listDesigns(), this.storePanel.refresh()]);
    showPartResult(this.storeFailure, 'The store in use', store);
    showPartResult(this.portsFailure, 'The port list', ports);
    showPartResult(this.profilesFailure, 'The instrument profiles', profiles);
    showPartResult(this.designsFailure, 'The saved designs', designs);
    if (ports.status === 'fulfilled') {
      replaceChildren(this.portList, ports.value.ports.map((port) => h('option', { value: port.address ?? port.path }, [port.kind === 'usbtmc' ? 'USBTMC' : port.path, port.manufacturer, port.serialNumber].filter(Boolean).join(' '))));
      this.portsNote.textContent = ports.value.incomplete ?? '';
      this.portsNote.hidden = !ports.value.incomplete;
    }
    if (profiles.status === 'fulfilled') {
      this.profiles = profiles.value;
      this.renderProfiles();
    }
    if (designs.status === 'fulfilled') this.renderDesigns(designs.value);
    await this.refreshBench();
  }

  private renderDesigns(designs: DesignRecord[]): void {
    // Keep what the user picked here if it still exists; else the design open on the Design view; else the newest.
    const previous = Number(this.simulatedDesignSelect.value);
    const chosen = designs.some((d) => d.id === previous) ? previous : this.state.current.design?.id ?? designs.at(-1)?.id;
    replaceChildren(this.simulatedDesignSelect, designs.length === 0 ? h('option', { value: '' }, 'Save a design first (Design view)') : designs.map((d) => h('option', { value: String(d.id) }, `${d.name} (#${d.id})`)));
    if (chosen !== undefined) this.simulatedDesignSelect.value = String(chosen);
  }

  private async refreshBench(): Promise<void> {
    await this.state.refreshBench(() => this.client.benchStatus());
  }

  private renderProfiles(): void {
    const role = this.roleSelect.value;
    const matching = this.profiles.filter((p) => p.role === role);
    replaceChildren(this.profileSelect, matching.map((p) => h('option', { value: p.id }, `${p.id}${p.builtIn ? '' : ' (yours)'} — ${p.description}`)));
  }

  private renderBench(bench: BenchStatus | undefined): void {
    if (!bench) return;
    if (document.activeElement !== this.maxInput) this.maxInput.value = bench.maxStimulusVpp > 0 ? String(bench.maxStimulusVpp) : '';
    this.maxSource.textContent = maxStimulusSourceText(bench);
    replaceChildren(
      this.instrumentsBody,
      bench.instruments.length === 0
        ? h('tr', {}, h('td', { colspan: '5', className: 'empty' }, 'No instruments connected.'))
        : bench.instruments.map((instrument) => {
            const disconnect = h('button', { type: 'button', className: 'small' }, 'Disconnect');
            disconnect.addEventListener('click', () => void guarded(disconnect, 'Disconnecting', async () => {
              await this.client.disconnect(instrument.role);
              await this.refreshBench();
            }));
            const identity = instrument.identity;
            return h(
              'tr',
              {},
              h('th', { scope: 'row' }, instrument.role),
              h('td', {}, instrument.address),
              h('td', {}, instrument.profileId),
              h('td', {}, h('strong', {}, `${identity.manufacturer} ${identity.model}`.trim()), h('small', {}, ` serial ${identity.serialNumber || '—'}, firmware ${identity.firmware || '—'}`), instrument.simulated ? h('span', { className: 'badge simulated' }, 'simulated') : null),
              h('td', {}, disconnect),
            );
          }),
    );
    const simulated = bench.simulatedBench;
    this.simulatedStatus.textContent = simulated
      ? `Running (simulated): ${simulated.designName} — ${Object.entries(simulated.addresses).map(([role, address]) => `${role} at ${address}`).join(', ')}`
      : 'Not running.';
  }

  /** The per-operation table of a profile check (the output is never left on by a check). */
  private renderCheck(report: ProfileCheckReport): void {
    this.checkTitle.textContent = `${report.profileId} (${report.role}) at ${report.address}: ${report.identity.manufacturer} ${report.identity.model}`;
    const said = (c: ProfileCheckReport['checks'][number]) =>
      c.outcome === 'refused' ? `${c.errorCode}, "${c.errorMessage}"` : c.outcome === 'unparsed' ? `${c.detail ?? ''} — received ${c.received ?? ''}` : c.received ?? c.detail ?? '';
    replaceChildren(
      this.checkBody,
      report.checks.map((c) =>
        h('tr', { className: `check-${c.outcome}` }, h('th', { scope: 'row' }, c.operation), h('td', {}, c.outcome), h('td', {}, said(c)), h('td', {}, `${c.replyMs.toFixed(1)} ms`), h('td', {}, h('code', {}, c.commands))),
      ),
    );
  }

  private appendTraffic(line: TrafficLine): void {
    const item = h('li', { className: `traffic-${line.direction}` }, h('time', {}, line.at.slice(11, 23)), h('span', { className: 'role' }, line.role), h('span', { className: 'direction' }, line.direction === 'sent' ? '→' : '←'), h('code', {}, line.text));
    const atBottom = this.traffic.scrollTop + this.traffic.clientHeight >= this.traffic.scrollHeight - 4;
    this.traffic.appendChild(item);
    while (this.traffic.childElementCount > TRAFFIC_LINES_KEPT) this.traffic.firstElementChild?.remove();
    if (atBottom) this.traffic.scrollTop = this.traffic.scrollHeight;
  }
}

/** Each bench keeps its own limit (the simulated bench and the real instruments too): say whose is in force. */
export function maxStimulusSourceText(bench: BenchStatus): string {
  if (bench.maxStimulusLimit) return asSentence(limitSourceText(bench.maxStimulusLimit));
  if (bench.maxStimulusVpp > 0) return 'Not saved yet: it becomes the setting of the bench you connect or start next.';
  return bench.bench ? `Not set for ${benchDescription(bench.bench)}: set it before connecting a generator.` : 'Not set: set it before connecting a generator.';
}
