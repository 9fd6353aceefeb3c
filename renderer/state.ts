/**
 * What the views share: the chosen design and build, the run on the Sweep
 * view, the runs picked for Compare and Record, and the latest bench status.
 * Views subscribe and re-render the parts that depend on a change.
 */
import type { BenchStatus, BuildRecord, DesignRecord } from '../app/contract/contract';
import type { ViewId } from './model/views';

export interface SharedState {
  design: DesignRecord | undefined;
  build: BuildRecord | undefined;
  /** Run shown on the Sweep view (live or reopened). */
  sweepRunId: number | undefined;
  /** Runs picked in History for Compare and Record, in the order picked. */
  pickedRunIds: number[];
  bench: BenchStatus | undefined;
}

type Listener = (state: SharedState, changed: Array<keyof SharedState>) => void;

export class AppState {
  private state: SharedState = { design: undefined, build: undefined, sweepRunId: undefined, pickedRunIds: [], bench: undefined };
  private readonly listeners = new Set<Listener>();
  /** Set by the shell: lets one view send the user to another. */
  showView: (view: ViewId) => void = () => {};
  /** Set by the shell: re-reads the current view after the event connection came back. */
  resyncView: () => void = () => {};

  get current(): SharedState {
    return this.state;
  }

  /** Counts bench-status updates, so a slow read cannot overwrite a newer status (see refreshBench). */
  private benchVersion = 0;

  update(changes: Partial<SharedState>): void {
    if ('bench' in changes) this.benchVersion++;
    this.state = { ...this.state, ...changes };
    const changed = Object.keys(changes) as Array<keyof SharedState>;
    for (const listener of this.listeners) listener(this.state, changed);
  }

  subscribe(listener: Listener): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  /**
   * Reads the bench status and applies it unless a newer one (a command's
   * result or a bench event) arrived while the read was in flight.
   */
  async refreshBench(read: () => Promise<BenchStatus>): Promise<void> {
    const version = this.benchVersion;
    const bench = await read();
    if (this.benchVersion === version) this.update({ bench });
  }

  togglePicked(runId: number, picked: boolean): void {
    const rest = this.state.pickedRunIds.filter((id) => id !== runId);
    this.update({ pickedRunIds: picked ? [...rest, runId] : rest });
  }
}
