/**
 * Points of the run being measured, kept columnar and sorted by stimulus as
 * they arrive (refinement points land between coarse ones). A point seen
 * twice (an event replayed after a reconnect) is kept once.
 */
import type { ServiceEvents } from '../../app/contract/contract';

export type PointEvent = ServiceEvents['point'];

export class LivePoints {
  readonly index: number[] = [];
  readonly stimulus: number[] = [];
  readonly gainDb: number[] = [];
  readonly phaseDeg: number[] = [];
  readonly outputV: number[] = [];
  readonly flags: number[] = [];
  private readonly seenIndexes = new Set<number>();

  constructor(readonly runId: number) {}

  get count(): number {
    return this.stimulus.length;
  }

  /** Returns false when the point belongs to another run or was already seen. */
  add(point: PointEvent): boolean {
    if (point.runId !== this.runId || this.seenIndexes.has(point.index)) return false;
    this.seenIndexes.add(point.index);
    let at = this.stimulus.length;
    while (at > 0 && this.stimulus[at - 1] > point.stimulus) at--;
    this.index.splice(at, 0, point.index);
    this.stimulus.splice(at, 0, point.stimulus);
    this.gainDb.splice(at, 0, point.gainDb);
    this.phaseDeg.splice(at, 0, point.phaseDeg);
    this.outputV.splice(at, 0, point.outputV);
    this.flags.splice(at, 0, point.flags);
    return true;
  }

  /** Adds the points of another buffer of the same run (e.g. events that arrived while the stored points loaded). */
  addAll(other: LivePoints): void {
    for (let i = 0; i < other.count; i++) {
      this.add({ runId: other.runId, index: other.index[i], stimulus: other.stimulus[i], gainDb: other.gainDb[i], phaseDeg: other.phaseDeg[i], outputV: other.outputV[i], flags: other.flags[i], gainUncertaintyDb: 0, phaseUncertaintyDeg: 0 });
    }
  }

  /** Loads what the store already holds (e.g. when a paused run is reopened). */
  static fromColumns(runId: number, columns: { step: number[]; stimulus: number[]; gainDb: number[]; phaseDeg: number[]; outputV: number[]; flags: number[] }): LivePoints {
    const points = new LivePoints(runId);
    for (let i = 0; i < columns.stimulus.length; i++) {
      points.add({
        runId,
        index: columns.step[i] ?? i,
        stimulus: columns.stimulus[i],
        gainDb: columns.gainDb[i],
        phaseDeg: columns.phaseDeg[i],
        outputV: columns.outputV[i],
        flags: columns.flags[i],
        gainUncertaintyDb: 0,
        phaseUncertaintyDeg: 0,
      });
    }
    return points;
  }
}
