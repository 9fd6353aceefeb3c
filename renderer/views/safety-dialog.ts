/** The safety cautions, shown once on first start until the user dismisses them; remembered per browser profile. */
import { SAFETY_NOTICE_POINTS } from '../../app/contract/safety';
import { h } from '../dom';

const ACKNOWLEDGED_KEY = 'rolloff.safetyNotice.acknowledged.v1';

export function safetyList(): HTMLElement {
  return h('ul', { className: 'safety-points' }, SAFETY_NOTICE_POINTS.map((point) => h('li', {}, point)));
}

export function openSafetyDialogIfNew(root: HTMLElement): void {
  if (readAcknowledged()) return;
  const confirm = h('button', { type: 'button', className: 'primary', 'data-testid': 'safety-ok' }, 'I have read this');
  const dialog = h(
    'dialog',
    { className: 'safety-dialog', 'aria-labelledby': 'safety-title', 'data-testid': 'safety-dialog' },
    h('h2', { id: 'safety-title' }, 'Before you connect anything'),
    safetyList(),
    h('p', { className: 'hint' }, 'You can read this again under About (Alt+0).'),
    h('div', { className: 'actions' }, confirm),
  );
  confirm.addEventListener('click', () => {
    writeAcknowledged(true);
    dialog.close();
    dialog.remove();
  });
  root.appendChild(dialog);
  dialog.showModal();
  confirm.focus();
}

function readAcknowledged(): boolean {
  try {
    return localStorage.getItem(ACKNOWLEDGED_KEY) === 'yes';
  } catch {
    return false;
  }
}

export function writeAcknowledged(acknowledged: boolean): void {
  try {
    if (acknowledged) localStorage.setItem(ACKNOWLEDGED_KEY, 'yes');
    else localStorage.removeItem(ACKNOWLEDGED_KEY);
  } catch {
    // Storage may be disabled; the notice then shows at every start, which is the safe side.
  }
}
