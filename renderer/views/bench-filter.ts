/**
 * The bench filter History and Compare share: a search box taking a bench's
 * exact name (as `rolloff runs --bench` does), offering the benches of the
 * runs in the store, and the label a run's bench is shown with.
 */
import type { RunSummary } from '../../app/contract/contract';
import { h, replaceChildren } from '../dom';

export interface BenchFilter {
  input: HTMLInputElement;
  /** The input's list of bench names; place it beside the input. */
  list: HTMLDataListElement;
  /** The name typed, trimmed; undefined for any bench. */
  value(): string | undefined;
  /** Offers the benches of these runs (every run in the store, unfiltered). */
  offer(runs: RunSummary[]): void;
}

/** `idPrefix` names the elements: `${idPrefix}-bench` is the input's test id, `${idPrefix}-bench-list` the list. */
export function benchFilter(idPrefix: string): BenchFilter {
  const list = h('datalist', { id: `${idPrefix}-bench-list` });
  const input = h('input', { type: 'search', name: 'bench', list: list.id, placeholder: 'any bench', 'data-testid': `${idPrefix}-bench` });
  return {
    input,
    list,
    value: () => input.value.trim() || undefined,
    offer(runs) {
      const names = [...new Set(runs.map((run) => run.benchName).filter((name) => name !== ''))].sort();
      replaceChildren(list, names.map((name) => h('option', { value: name })));
    },
  };
}

/** A run's bench as the views show it; runs stored before benches had names have none. */
export function benchLabel(run: RunSummary): string {
  return run.benchName || '—';
}
