/** About: version, the safety cautions, and a way to see the first-start notice again. */
import { SOFTWARE_VERSION } from '../../app/contract/version';
import { h } from '../dom';
import { showInfo } from '../notices';
import type { View } from '../shell';
import { safetyList, writeAcknowledged } from './safety-dialog';

export class AboutView implements View {
  readonly id = 'about' as const;
  readonly element: HTMLElement;

  constructor() {
    const reset = h('button', { type: 'button' }, 'Show the safety notice at next start');
    reset.addEventListener('click', () => {
      writeAcknowledged(false);
      showInfo('The safety notice will show the next time Rolloff opens.');
    });
    this.element = h(
      'section',
      { 'aria-labelledby': 'about-title' },
      h('h2', { id: 'about-title' }, 'About Rolloff'),
      h('p', {}, `Version ${SOFTWARE_VERSION}. Sweeps op-amp stages over SCPI and compares what you measure with the response of the circuit you drew.`),
      h('h3', {}, 'Safety'),
      safetyList(),
      reset,
      h('h3', {}, 'Keyboard'),
      h('p', {}, 'Alt+1 … Alt+6 open Bench, Design, Sweep, History, Compare and Record; Alt+0 opens this page. Tab moves through the controls of a view in reading order.'),
    );
  }

  activate(): void {}
}
