/**
 * Messages to the user: errors show what happened and what to do (the
 * service's message and hint), in a live region screen readers announce.
 */
import { UserError } from '../app/errors';
import { h } from './dom';

let region: HTMLElement | undefined;

export function noticeRegion(): HTMLElement {
  region ??= h('div', { className: 'notices', role: 'status', 'aria-live': 'polite' });
  return region;
}

export function showError(error: unknown, context?: string): void {
  const message = error instanceof Error ? error.message : String(error);
  const hint = error instanceof UserError ? error.hint : undefined;
  push('error', `${context ? context + ': ' : ''}${message}`, hint);
  if (!(error instanceof UserError)) console.error(error);
}

export function showInfo(message: string): void {
  push('info', message);
}

/** Information that stays until dismissed: a change the user did not make here and must not miss. */
export function showLastingInfo(message: string, hint?: string): void {
  push('info', message, hint, { lasting: true });
}

function push(kind: 'error' | 'info', message: string, hint?: string, options: { lasting?: boolean } = {}): void {
  const close = h('button', { type: 'button', className: 'notice-close', 'aria-label': 'Dismiss message' }, '×');
  const notice = h('div', { className: `notice notice-${kind}`, role: kind === 'error' ? 'alert' : undefined }, h('p', {}, message), hint ? h('p', { className: 'hint' }, hint) : null, close);
  close.addEventListener('click', () => notice.remove());
  noticeRegion().appendChild(notice);
  // Information fades; errors stay until dismissed so nothing is missed.
  if (kind === 'info' && !options.lasting) setTimeout(() => notice.remove(), 3_500);
  while (noticeRegion().childElementCount > 3) noticeRegion().firstElementChild?.remove();
}

/** Runs an action from a button: disables it meanwhile and reports a failure. */
export async function guarded<T>(button: HTMLButtonElement | undefined, context: string, action: () => Promise<T>): Promise<T | undefined> {
  if (button) button.disabled = true;
  try {
    return await action();
  } catch (error) {
    showError(error, context);
    return undefined;
  } finally {
    if (button) button.disabled = false;
  }
}

/**
 * Shows, in a slot beside the part of a view it concerns, why that part could
 * not be loaded (message and hint), or clears the slot when it loaded. A view
 * that loads several things uses one slot per thing, so one failing source
 * never hides the others.
 */
/** Where one part of a view says it could not be loaded (filled by showPartResult); hidden while the part loads fine. */
export function partFailureSlot(testId: string): HTMLElement {
  return h('div', { className: 'part-failure', role: 'alert', 'data-testid': testId, hidden: true });
}

export function showPartResult(slot: HTMLElement, what: string, result: PromiseSettledResult<unknown>): void {
  if (result.status === 'fulfilled') {
    clearProblem(slot);
    return;
  }
  showProblem(slot, `${what} could not be loaded: `, result.reason);
}

/** Says in a slot beside a part of a view what went wrong there (the lead, the message, the hint). */
export function showProblem(slot: HTMLElement, lead: string, error: unknown): void {
  const message = error instanceof Error ? error.message : String(error);
  const hint = error instanceof UserError ? error.hint : undefined;
  slot.replaceChildren(h('p', {}, `${lead}${message}`), hint ? h('p', { className: 'hint' }, hint) : '');
  slot.hidden = false;
  if (!(error instanceof UserError)) console.error(error);
}

export function clearProblem(slot: HTMLElement): void {
  slot.replaceChildren();
  slot.hidden = true;
}
