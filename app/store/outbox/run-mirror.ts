/**
 * What a bench knows of a run it drives, kept in memory so the sweep can go on
 * reading its own run (next step, points for refinement and analysis, status)
 * while the server cannot be asked: the run and its points as they were when
 * the bench claimed it, with every write of the bench since applied.
 */
import type { PointColumns, RunEvent, RunFigures, RunStatus, Verdict } from '../../contract/contract';
import { FINISHED_STATUSES } from '../record-checks';
import type { NewPoint, StoredRun } from '../types';

type MirroredPoint = { [K in keyof PointColumns]: PointColumns[K][number] };

export class RunMirror {
  private readonly points = new Map<number, MirroredPoint>();

  constructor(private run: StoredRun, stored: PointColumns, private readonly events: RunEvent[], readonly claimantOwnerId: string) {
    for (let i = 0; i < stored.step.length; i++) {
      this.points.set(stored.step[i], {
        step: stored.step[i], stimulus: stored.stimulus[i], amplitudeVpp: stored.amplitudeVpp[i], gainDb: stored.gainDb[i],
        gainUncertaintyDb: stored.gainUncertaintyDb[i], phaseDeg: stored.phaseDeg[i], phaseUncertaintyDeg: stored.phaseUncertaintyDeg[i],
        outputV: stored.outputV[i], flags: stored.flags[i], measuredAt: stored.measuredAt[i],
      });
    }
  }

  /** The run as the server last told it, with the bench's later writes applied. */
  storedRun(): StoredRun {
    return structuredClone({ ...this.run, pointCount: this.points.size });
  }

  /** A fresher copy from the server. */
  refresh(run: StoredRun): void {
    this.run = run;
  }

  addPoint(point: NewPoint & { measuredAt: string }): void {
    if (this.points.has(point.step)) return;
    this.points.set(point.step, {
      step: point.step, stimulus: point.stimulus, amplitudeVpp: point.amplitudeVpp, gainDb: point.gainDb, gainUncertaintyDb: point.gainUncertaintyDb,
      phaseDeg: point.phaseDeg, phaseUncertaintyDeg: point.phaseUncertaintyDeg, outputV: point.outputV, flags: point.flags,
      measuredAt: new Date(Date.parse(point.measuredAt)).toISOString(),
    });
  }

  /** The same stamping rules as the stores (RunStore.updateRunStatus). */
  setStatus(status: RunStatus, at: string): void {
    const run = this.run;
    run.status = status;
    if (status === 'running') {
      run.startedAt ??= at;
      run.endedAt = null;
    } else if (FINISHED_STATUSES.has(status)) {
      run.endedAt = at;
    }
  }

  setResults(figures: RunFigures, verdict: Verdict | null): void {
    this.run.figures = figures;
    this.run.verdict = verdict;
  }

  addEvent(event: RunEvent): void {
    this.events.push(event);
  }

  eventList(): RunEvent[] {
    return this.events.map((event) => ({ ...event }));
  }

  nextStep(): number {
    let next = 0;
    for (const step of this.points.keys()) next = Math.max(next, step + 1);
    return next;
  }

  pointColumns(): PointColumns {
    const ordered = [...this.points.values()].sort((a, b) => a.step - b.step);
    const column = <K extends keyof MirroredPoint>(name: K) => ordered.map((point) => point[name]) as PointColumns[K];
    return {
      step: column('step'), stimulus: column('stimulus'), amplitudeVpp: column('amplitudeVpp'), gainDb: column('gainDb'),
      gainUncertaintyDb: column('gainUncertaintyDb'), phaseDeg: column('phaseDeg'), phaseUncertaintyDeg: column('phaseUncertaintyDeg'),
      outputV: column('outputV'), flags: column('flags'), measuredAt: column('measuredAt'),
    };
  }
}
