/**
 * The Bench view's Store panel: which store the window works on (a lab
 * store's address never shows a password) and a form to open another — a
 * SQLite file path or a lab store's address. A refusal (an unknown form, a
 * password in the address, a server that cannot be reached, an active run)
 * is said beside the form; on success every view reads the new store. A store
 * chosen in another window of the same host arrives as the 'store' event: this
 * window follows it, and says so until dismissed.
 */
import type { RolloffClient, StoreInUse } from '../../app/contract/contract';
import { hasPasswordInAddress, StoreLocationSchema } from '../../app/contract/store-choice';
import { checkValue } from '../../app/contract/check-call';
import { field, h, replaceChildren } from '../dom';
import { clearProblem, showInfo, showLastingInfo, showProblem } from '../notices';
import type { AppState } from '../state';

const SOURCE_TEXT: Record<StoreInUse['source'], string> = {
  'command line': 'Named by --db when this window\'s host started.',
  environment: 'Named by ROLLOFF_DB when this window\'s host started.',
  'saved setting': 'The store chosen in this window, saved for each start.',
  default: 'The default file in the per-user data folder.',
  'chosen in the window': 'Chosen in a window of this host.',
};

export class StorePanel {
  readonly element: HTMLElement;
  private readonly inUse = h('p', { 'data-testid': 'store-in-use' }, 'Reading the store in use…');
  private readonly about = h('div', { className: 'hint', 'data-testid': 'store-about' });
  private readonly locationInput = h('input', {
    type: 'text',
    name: 'store-location',
    autocomplete: 'off',
    spellcheck: 'false',
    placeholder: '/path/to/bench.sqlite or postgres://user@host:5432/lab',
    'data-testid': 'store-location',
  });
  private readonly result = h('div', { className: 'part-failure', role: 'alert', 'data-testid': 'store-result', hidden: true });
  /** The store this panel shows, and whether this window is choosing one now (its own change then arrives as an event too). */
  private shownLocation: string | undefined;
  private choosing = false;

  constructor(
    private readonly client: RolloffClient,
    private readonly state: AppState,
  ) {
    const useButton = h('button', { type: 'submit', 'data-testid': 'store-use' }, 'Use this store');
    const form = h(
      'form',
      { className: 'stack-form', 'aria-label': 'Choose the store' },
      field('Another store', this.locationInput, 'A SQLite file path (a new file is created), or a lab store\'s address postgres://USER@HOST:PORT/DATABASE. Its password goes in PGPASSWORD or a password file (~/.pgpass), never in the address.'),
      useButton,
      this.result,
    );
    form.addEventListener('submit', (event) => {
      event.preventDefault();
      void this.choose(useButton);
    });
    this.element = h('div', { className: 'panel', 'data-testid': 'store-panel' }, h('h3', {}, 'Store'), this.inUse, this.about, form);
    client.on('store', (store) => this.changedElsewhere(store));
  }

  async refresh(): Promise<void> {
    this.render(await this.client.storeInUse());
  }

  private async choose(button: HTMLButtonElement): Promise<void> {
    const location = this.locationInput.value;
    // A password typed by mistake does not stay on the screen, whatever the outcome.
    if (hasPasswordInAddress(location.trim())) this.locationInput.value = '';
    button.disabled = true;
    clearProblem(this.result);
    this.choosing = true;
    try {
      // The host checks it as well; checked here first, a password never leaves the page.
      const store = await this.client.chooseStore(checkValue(StoreLocationSchema, location, 'store address'));
      this.locationInput.value = '';
      this.render(store);
      this.forgetOldStore();
      showInfo(`Now using ${store.location}.`);
    } catch (error) {
      showProblem(this.result, 'This store cannot be used: ', error);
    } finally {
      this.choosing = false;
      button.disabled = false;
    }
  }

  /** Another window of this host chose a store: follow it, and say so until dismissed. */
  private changedElsewhere(store: StoreInUse): void {
    if (this.choosing || store.location === this.shownLocation) return; // this window's own choice: choose() handles it
    this.render(store);
    this.forgetOldStore();
    showLastingInfo(`Another window of this host opened a different store: this window now works on ${store.location}.`, 'Designs, builds and runs shown before were of the previous store; every view has been read again.');
  }

  /** Designs, builds and runs of the old store mean nothing in the new one. */
  private forgetOldStore(): void {
    this.state.update({ design: undefined, build: undefined, sweepRunId: undefined, pickedRunIds: [] });
    this.state.resyncView();
  }

  private render(store: StoreInUse): void {
    this.shownLocation = store.location;
    replaceChildren(this.inUse, `In use: ${store.kind === 'lab store' ? 'lab store' : 'SQLite file'} `, h('code', { 'data-testid': 'store-location-in-use' }, store.location));
    const kept = store.choiceKept === 'saved'
      ? `A store chosen here is saved${store.settingsFile ? ` in ${store.settingsFile}` : ''} and opened at the next start.`
      : 'A store chosen here applies until this host (rolloff serve) stops; its next start opens the store it is started with.';
    replaceChildren(this.about, [SOURCE_TEXT[store.source], kept, ...store.notes].map((line) => h('p', {}, line)));
  }
}
