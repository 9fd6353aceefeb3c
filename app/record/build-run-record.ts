/**
 * RunDetail (from the service) + design and build → RunRecord. This is the
 * boundary where service data becomes a record, so it is checked here once:
 * column lengths agree, identifiers are present, non-finite numbers become null.
 */
import { ValidationError } from '../errors';
import type { BuildRecord, PointColumns, RunDetail, TheoryColumns } from '../contract/contract';
import { SAFETY_NOTICE_POINTS } from '../contract/safety';
import { SOFTWARE_VERSION } from '../contract/version';
import { OUTPUT_KEY, outputReadingOf, type OutputReading } from '../contract/vocabulary';
import { runDigest } from './digest';
import {
  RECORD_FORMAT_VERSION,
  type MaybeNumber,
  type RecordDcFit,
  type RecordPoints,
  type RecordTheory,
  type RunRecord,
} from './model';

export interface RunRecordContext {
  /** The design file's JSON as stored. */
  design: unknown;
  /** Store id of the design, when known. */
  designId?: number;
  /** Stable id of the design, when known. */
  designUid?: string;
  build: BuildRecord;
  /** DC log stage: fitted transfer curve to draw (made by dcFitCurve in app/service/export.ts). */
  dcFit?: RecordDcFit | null;
  /** ISO time the record is generated; defaults to now. Fixed in tests for reproducible output. */
  generatedAt?: string;
}

export function buildRunRecord(detail: RunDetail, context: RunRecordContext): RunRecord {
  const where = `run ${detail?.id}`;
  if (!detail || typeof detail !== 'object') throw new ValidationError('run', 'no run detail was given');
  if (!Number.isInteger(detail.id)) throw new ValidationError('run.id', `"${detail.id}" is not a run id`);
  if (!context?.build) throw new ValidationError(`${where}.build`, 'the build of the run is missing');
  if (context.build.id !== detail.buildId) {
    throw new ValidationError(`${where}.build`, `build ${context.build.id} was given but the run belongs to build ${detail.buildId}`);
  }
  const points = normalisePoints(detail.points, `${where}.points`, outputReadingOf(detail.kind, detail.request.measurement));
  const theory = normaliseTheory(detail, `${where}.theory`);
  const body = {
    run: {
      id: detail.id,
      uid: detail.uid,
      kind: detail.kind,
      status: detail.status,
      startedAt: detail.startedAt ?? null,
      endedAt: detail.endedAt ?? null,
      operator: detail.request?.operator ?? '',
      notes: detail.request?.notes ?? '',
      simulated: Boolean(detail.simulated),
      softwareVersion: detail.softwareVersion ?? 'unknown',
      pointCount: points.step.length,
      plannedCount: detail.plannedCount,
      plan: detail.request,
      offlinePeriods: (detail.offlinePeriods ?? []).map((period) => ({ from: period.from, to: period.to })),
    },
    ...measuredOn(detail, context),
    points,
  };
  return jsonSafe({
    recordType: 'run',
    formatVersion: RECORD_FORMAT_VERSION,
    title: `${detail.kind === 'ac' ? 'Frequency response' : 'DC transfer'} of ${context.build.label} (run ${detail.id})`,
    generatedAt: context.generatedAt ?? new Date().toISOString(),
    generatedBy: `Rolloff ${SOFTWARE_VERSION}`,
    safetyNotice: [...SAFETY_NOTICE_POINTS],
    ...body,
    theory,
    dcFit: context.dcFit ?? null,
    figures: detail.figures ?? { minus3dbHz: [] },
    verdict: detail.verdict ?? null,
    events: detail.events ?? [],
    digest: runDigest(jsonSafe(body)),
  }) as RunRecord;
}

/** The design, build and instruments a run was measured on, as a record lists them. */
export function measuredOn(detail: Pick<RunDetail, 'designName' | 'bench'>, context: Pick<RunRecordContext, 'design' | 'designId' | 'designUid' | 'build'>): Pick<RunRecord, 'design' | 'build' | 'bench'> {
  return {
    design: { id: context.designId ?? context.build.designId ?? null, uid: context.designUid ?? null, name: detail.designName, content: context.design ?? null },
    build: {
      id: context.build.id,
      uid: context.build.uid,
      label: context.build.label,
      notes: context.build.notes ?? '',
      actualValues: { ...(context.build.actualValues ?? {}) },
      createdAt: context.build.createdAt ?? null,
    },
    bench: (detail.bench ?? []).map((instrument) => ({ ...instrument, identity: { ...instrument.identity } })),
  };
}

function finiteOrNull(value: unknown): MaybeNumber {
  return typeof value === 'number' && Number.isFinite(value) ? value : null;
}

/** One column of `length` values, non-finite ones null; a column of another length is refused. */
export function column(values: unknown, length: number, where: string): MaybeNumber[] {
  if (!Array.isArray(values) || values.length !== length) {
    throw new ValidationError(where, `has ${Array.isArray(values) ? values.length : 'no'} values where ${length} were expected`, 'The run data is inconsistent; re-read it from the store.');
  }
  return values.map(finiteOrNull);
}

function normalisePoints(points: PointColumns, where: string, reading: OutputReading): RecordPoints {
  if (!points || !Array.isArray(points.step)) throw new ValidationError(where, 'the points of the run are missing');
  const length = points.step.length;
  const flags = column(points.flags, length, `${where}.flags`).map((f) => f ?? 0);
  const measuredAt = points.measuredAt;
  if (!Array.isArray(measuredAt) || measuredAt.length !== length) throw new ValidationError(`${where}.measuredAt`, `does not have ${length} entries`);
  return {
    step: column(points.step, length, `${where}.step`).map((s, i) => s ?? i),
    stimulus: column(points.stimulus, length, `${where}.stimulus`),
    stimulusSettingVpp: column(points.amplitudeVpp, length, `${where}.amplitudeVpp`),
    gainDb: column(points.gainDb, length, `${where}.gainDb`),
    gainUncertaintyDb: column(points.gainUncertaintyDb, length, `${where}.gainUncertaintyDb`),
    phaseDeg: column(points.phaseDeg, length, `${where}.phaseDeg`),
    phaseUncertaintyDeg: column(points.phaseUncertaintyDeg, length, `${where}.phaseUncertaintyDeg`),
    [OUTPUT_KEY[reading]]: column(points.outputV, length, `${where}.outputV`),
    flags,
    measuredAt: measuredAt.map(String),
  };
}

function normaliseTheory(detail: RunDetail, where: string): RecordTheory {
  const theory: TheoryColumns | undefined = detail.theory;
  const length = theory?.frequencyHz?.length ?? 0;
  const optional = (values: number[] | undefined, name: string) => (values && values.length > 0 ? column(values, length, `${where}.${name}`) : null);
  return {
    stimulus: length ? column(theory!.frequencyHz, length, `${where}.frequencyHz`) : [],
    gainDb: length ? column(theory!.gainDb, length, `${where}.gainDb`) : [],
    phaseDeg: length ? column(theory!.phaseDeg, length, `${where}.phaseDeg`) : [],
    idealGainDb: optional(theory?.idealGainDb, 'idealGainDb') ?? new Array(length).fill(null),
    idealPhaseDeg: optional(theory?.idealPhaseDeg, 'idealPhaseDeg') ?? new Array(length).fill(null),
    bandLowDb: optional(theory?.bandLowDb, 'bandLowDb'),
    bandHighDb: optional(theory?.bandHighDb, 'bandHighDb'),
    gainLimitHz: finiteOrNull(detail.theoryGainLimitHz),
    minus3dbHz: (detail.theoryMinus3dbHz ?? []).filter((f) => Number.isFinite(f)),
  };
}

/** Drops undefined and turns non-finite numbers into null, so the record survives JSON unchanged. */
export function jsonSafe<T>(value: T): T {
  return JSON.parse(JSON.stringify(value, (_key, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v)));
}
