/**
 * What a bench knows of a run it drives, kept in memory so the sweep can go on
 * reading its own run (next step, points for refinement and analysis, status)
 * while the server cannot be asked: the run and its points as they were when
 * the bench claimed it, with every write of the bench since applied.
 */
import type { PointColumns, RunEvent, RunFigures, RunStatus, Verdict } from '../../contract/contract';
import { FINISHED_STATUSES, noiseRecordAt } from '../record-checks';
import type { NewNoiseRecord, NewPoint, StoredNoiseRecords, StoredRun } from '../types';

type MirroredPoint = { [K in keyof PointColumns]: PointColumns[K][number] };
type MirroredNoiseRecord = NewNoiseRecord & { measuredAt: string };

export class RunMirror {
  private readonly points = new Map<number, MirroredPoint>();
  /** A noise run's records (its steps), kept as the points are. */
  private readonly noiseRecords = new Map<number, MirroredNoiseRecord>();

  constructor(
    private run: StoredRun,
    stored: PointColumns,
    private readonly events: RunEvent[],
    readonly claimantOwnerId: string,
    storedNoiseRecords?: StoredNoiseRecords,
  ) {
    for (let i = 0; i < (storedNoiseRecords?.step.length ?? 0); i++) {
      const record = noiseRecordAt(storedNoiseRecords!, i);
      this.noiseRecords.set(record.step, { ...record, measuredAt: storedNoiseRecords!.measuredAt[i] }); // noiseRecordAt's measuredAt, typed as given
    }
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
    return structuredClone({ ...this.run, pointCount: this.points.size + this.noiseRecords.size });
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

  addNoiseRecord(record: MirroredNoiseRecord): void {
    if (this.noiseRecords.has(record.step)) return;
    this.noiseRecords.set(record.step, { ...record, measuredAt: new Date(Date.parse(record.measuredAt)).toISOString() });
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
    for (const step of [...this.points.keys(), ...this.noiseRecords.keys()]) next = Math.max(next, step + 1);
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

  noiseRecordColumns(): StoredNoiseRecords {
    const ordered = [...this.noiseRecords.values()].sort((a, b) => a.step - b.step);
    return {
      step: ordered.map((r) => r.step), sampleRateHz: ordered.map((r) => r.sampleRateHz), segments: ordered.map((r) => r.segments),
      degreesOfFreedom: ordered.map((r) => r.degreesOfFreedom), rmsV: ordered.map((r) => r.rmsV), meanV: ordered.map((r) => r.meanV),
      flags: ordered.map((r) => r.flags), measuredAt: ordered.map((r) => r.measuredAt),
      psdV2PerHz: ordered.map((r) => (r.psdV2PerHz === undefined ? null : Float64Array.from(r.psdV2PerHz))),
    };
  }
}
