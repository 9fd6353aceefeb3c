/**
 * Resuming a run of another bench: the service refuses it until the user
 * repeats that bench's name (app/contract/bench-take-over.ts). The window asks
 * in a dialog that names the bench, then resumes with that confirmation.
 */
import type { RolloffClient, RunSummary } from '../../app/contract/contract';
import { TAKE_OVER_NOT_CONFIRMED } from '../../app/contract/bench-take-over';
import { h } from '../dom';

/** Resumes the run; asks first when it is another bench's. undefined when the user declined. */
export async function resumeConfirmingTakeOver(client: Pick<RolloffClient, 'resumeRun'>, run: Pick<RunSummary, 'id' | 'benchName'>): Promise<RunSummary | undefined> {
  try {
    return await client.resumeRun(run.id);
  } catch (error) {
    if ((error as Error).name !== TAKE_OVER_NOT_CONFIRMED || !run.benchName) throw error;
    if (!(await confirmTakeOver(run.id, run.benchName))) return undefined;
    return client.resumeRun(run.id, { takeOverFromBench: run.benchName });
  }
}

/** A modal question naming the run's bench; true when the user takes the run over. */
function confirmTakeOver(runId: number, benchName: string): Promise<boolean> {
  return new Promise((answer) => {
    const takeOver = h('button', { type: 'button', className: 'primary', 'data-testid': 'take-over-confirm' }, `Take over from bench “${benchName}”`);
    const cancel = h('button', { type: 'button', 'data-testid': 'take-over-cancel' }, 'Cancel');
    const dialog = h(
      'dialog',
      { className: 'take-over-dialog', 'aria-labelledby': 'take-over-title', 'data-testid': 'take-over-dialog' },
      h('h2', { id: 'take-over-title' }, `Run #${runId} belongs to bench “${benchName}”`),
      h('p', {}, `Continue it on this bench? Do so only if bench “${benchName}” is gone or no longer drives it: its instruments must not get commands from two benches.`),
      h('p', { className: 'hint' }, 'The run’s events will record the take-over.'),
      h('div', { className: 'actions' }, cancel, takeOver),
    );
    const close = (confirmed: boolean) => {
      dialog.close();
      dialog.remove();
      answer(confirmed);
    };
    takeOver.addEventListener('click', () => close(true));
    cancel.addEventListener('click', () => close(false));
    dialog.addEventListener('cancel', (event) => {
      event.preventDefault();
      close(false);
    });
    document.body.appendChild(dialog);
    dialog.showModal();
    cancel.focus(); // the safe answer is the default
  });
}
