/**
 * The window's frame: header with the bench status (always saying
 * "simulated" for the simulated bench), the view navigation with keyboard
 * shortcuts, the notice area, and the safety notice on first start.
 */
import type { BenchStatus, RolloffClient } from '../app/contract/contract';
import { h, replaceChildren } from './dom';
import { VIEWS, viewForShortcut, type ViewId } from './model/views';
import { noticeRegion, showError } from './notices';
import type { AppState } from './state';
import { openSafetyDialogIfNew } from './views/safety-dialog';

export interface View {
  readonly id: ViewId;
  readonly element: HTMLElement;
  /** Called each time the view is shown, to refresh lists from the service. */
  activate(): void | Promise<void>;
  /** After the event connection came back: re-read what events may have been missed (default: activate). */
  resync?(): void | Promise<void>;
}

export function mountShell(root: HTMLElement, client: RolloffClient, state: AppState, views: View[]): void {
  const benchChip = h('span', { className: 'bench-chip', 'data-testid': 'bench-chip' }, 'Bench: not connected');
  const nav = h('nav', { className: 'views-nav', 'aria-label': 'Views' });
  const main = h('main', { className: 'view-host', id: 'view-host', tabindex: '-1' });
  const buttons = new Map<ViewId, HTMLButtonElement>();
  for (const view of VIEWS) {
    const button = h(
      'button',
      { type: 'button', className: 'nav-button', 'data-view': view.id, 'aria-keyshortcuts': `Alt+${view.key}`, title: `${view.title} (Alt+${view.key})` },
      h('span', { className: 'nav-title' }, view.title),
      h('kbd', {}, `Alt+${view.key}`),
    );
    button.addEventListener('click', () => show(view.id));
    buttons.set(view.id, button);
    nav.appendChild(button);
  }
  for (const view of views) {
    view.element.hidden = true;
    view.element.classList.add('view');
    view.element.dataset.view = view.id;
    main.appendChild(view.element);
  }
  root.classList.add('app-root');
  replaceChildren(
    root,
    h('header', { className: 'top-bar' }, h('h1', { className: 'brand' }, 'Rolloff', h('small', {}, 'op-amp stage bench')), benchChip),
    h('div', { className: 'frame' }, nav, main),
    noticeRegion(),
  );

  let current: ViewId | undefined;
  function show(id: ViewId): void {
    const view = views.find((v) => v.id === id);
    if (!view) return;
    for (const other of views) other.element.hidden = other.id !== id;
    for (const [viewId, button] of buttons) {
      if (viewId === id) button.setAttribute('aria-current', 'page');
      else button.removeAttribute('aria-current');
    }
    current = id;
    document.title = `Rolloff — ${VIEWS.find((v) => v.id === id)?.title}`;
    Promise.resolve(view.activate()).catch((error) => showError(error, `Opening ${id}`));
  }
  state.resyncView = () => {
    const view = views.find((v) => v.id === current);
    if (view) Promise.resolve(view.resync ? view.resync() : view.activate()).catch((error) => showError(error, 'Re-reading after the reconnection'));
    state.refreshBench(() => client.benchStatus()).catch(() => undefined);
  };
  state.showView = (id) => {
    show(id);
    main.focus({ preventScroll: true });
  };

  document.addEventListener('keydown', (event) => {
    const target = viewForShortcut(event);
    if (target) {
      event.preventDefault();
      state.showView(target);
    }
  });

  const renderBench = (bench: BenchStatus | undefined) => {
    const simulated = bench?.simulatedBench !== undefined || (bench?.instruments ?? []).some((i) => i.simulated);
    const count = bench?.instruments.length ?? 0;
    benchChip.textContent = count === 0 && !bench?.simulatedBench ? 'Bench: not connected' : `Bench: ${count} instrument${count === 1 ? '' : 's'}${simulated ? ' — SIMULATED' : ''}`;
    benchChip.classList.toggle('simulated', simulated);
  };
  state.subscribe((s, changed) => {
    if (changed.includes('bench')) renderBench(s.bench);
  });
  client.on('bench', (bench) => state.update({ bench }));
  state.refreshBench(() => client.benchStatus()).catch((error) => showError(error, 'Reading the bench status'));

  show(current ?? 'bench');
  openSafetyDialogIfNew(root);
}
