/**
 * Shared view state: a bench-status read that was overtaken by a newer status
 * (a command's result or a bench event) must not overwrite it — the race seen
 * when the Bench view opens while the simulated bench starts. Common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { AppState } from '../../../renderer/state';
import type { BenchStatus } from '../../../app/contract/contract';

const stale: BenchStatus = { instruments: [], maxStimulusVpp: 2 };
const fresh: BenchStatus = { instruments: [], maxStimulusVpp: 2, simulatedBench: { addresses: {}, designName: 'invented' } };

describe('AppState.refreshBench', () => {
  it('drops a read that a newer status overtook', async () => {
    const state = new AppState();
    let answer: (status: BenchStatus) => void = () => {};
    const pending = state.refreshBench(() => new Promise((r) => (answer = r)));
    state.update({ bench: fresh });
    answer(stale);
    await pending;
    expect(state.current.bench).toBe(fresh);
  });

  it('applies a read when nothing newer arrived, and tells subscribers', async () => {
    const state = new AppState();
    const seen: unknown[] = [];
    state.subscribe((s, changed) => changed.includes('bench') && seen.push(s.bench));
    await state.refreshBench(async () => fresh);
    expect(state.current.bench).toBe(fresh);
    expect(seen).toEqual([fresh]);
  });

  it('keeps the picked runs in the order picked, once each', () => {
    const state = new AppState();
    state.togglePicked(3, true);
    state.togglePicked(1, true);
    state.togglePicked(3, true);
    expect(state.current.pickedRunIds).toEqual([1, 3]);
    state.togglePicked(1, false);
    expect(state.current.pickedRunIds).toEqual([3]);
  });
});
