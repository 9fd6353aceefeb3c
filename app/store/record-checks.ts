/**
 * The checks every store applies to what it is asked to write, before any
 * database sees it, so SQLite and PostgreSQL refuse the same values with the
 * same ValidationError naming the same field.
 */
import { ValidationError } from '../errors';
import { FINISHED_RUN_STATUSES, RUN_EVENT_LEVELS, RUN_KINDS, RUN_STATUSES, type OfflinePeriod, type RunEvent, type RunKind, type RunStatus } from '../contract/contract';
import { checkBenchName } from '../bench/bench-name';
import type { BenchSettingsInput, NewCalibration, NewNoiseRecord, NewPoint, NewRun, NewSchedule, OwnerCondition, RunClaimant, RunFilter, RunImport, StoredNoiseRecords } from './types';

/** The one list of run states (and of the finished ones) lives in the contract; re-exported for the store's checks. */
export { RUN_STATUSES, FINISHED_RUN_STATUSES as FINISHED_STATUSES };
const EVENT_LEVELS: ReadonlySet<string> = new Set(RUN_EVENT_LEVELS);
export const DEFAULT_LIST_LIMIT = 200;

export function requireId(value: number, where: string): number {
  if (!Number.isInteger(value) || value <= 0) throw new ValidationError(where, `${value} is not a valid id (a positive whole number)`);
  return value;
}

export function requireFinite(value: number, where: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) throw new ValidationError(where, `${value} is not a finite number`);
  return value;
}

export function requireText(value: unknown, where: string): string {
  if (typeof value !== 'string') throw new ValidationError(where, 'must be text');
  return value;
}

export function toJson(value: unknown, where: string): string {
  const text = JSON.stringify(value);
  if (text === undefined) throw new ValidationError(where, 'cannot be stored as JSON');
  return text;
}

/** A LIKE pattern matching the text anywhere, with LIKE's wildcards escaped by \ so "10%" finds the text "10%". */
export function likePattern(search: string): string {
  return `%${search.replace(/[\\%_]/g, (c) => '\\' + c)}%`;
}

export function checkDesignName(name: unknown): string {
  const trimmed = requireText(name, 'design.name').trim();
  if (trimmed.length === 0) throw new ValidationError('design.name', 'is empty', 'Give the design a name.');
  return trimmed;
}

export function checkBuildLabel(label: unknown): string {
  const trimmed = requireText(label, 'build.label').trim();
  if (trimmed.length === 0) throw new ValidationError('build.label', 'is empty', 'Give the build a label, e.g. "board 3".');
  return trimmed;
}

export function checkActualValues(actualValues: Record<string, number> | undefined): Record<string, number> {
  for (const [partId, value] of Object.entries(actualValues ?? {})) requireFinite(value, `build.actualValues.${partId}`);
  return actualValues ?? {};
}

/** The run's bench name: '' (not known) or a name as checkBenchName allows. */
export function checkRunBenchName(name: string | undefined): string {
  return name === undefined || name === '' ? '' : checkBenchName(requireText(name, 'run.benchName'), 'run.benchName');
}

/** The bench a run reserves while it is driven (createOwnedRun): a name checkBenchName allows, never '' (not known). */
export function checkBenchToReserve(name: string | undefined): string {
  const bench = checkRunBenchName(name);
  if (bench === '') throw new ValidationError('run.benchName', 'is empty', 'Name the bench that drives the run, so two runs never drive its instruments at once.');
  return bench;
}

/** The run's kind, one of the contract's, and for a noise run a request that says so. */
export function checkRunKind(input: Pick<NewRun, 'kind' | 'request'>): RunKind {
  const kind = input.kind;
  if (!RUN_KINDS.includes(kind)) throw new ValidationError('run.kind', `"${String(kind)}" is not a run kind`, `Use one of: ${RUN_KINDS.join(', ')}.`);
  if ((kind === 'noise') !== (input.request?.kind === 'noise')) {
    throw new ValidationError('run.request.kind', `"${String(input.request?.kind)}" does not match the run's kind "${kind}"`, 'A noise run carries a noise request; a sweep carries a sweep request.');
  }
  return kind;
}

export function checkRunStatus(status: unknown, where = 'run.status'): RunStatus {
  if (!RUN_STATUSES.includes(status as RunStatus)) {
    throw new ValidationError(where, `"${String(status)}" is not a run status`, `Use one of: ${RUN_STATUSES.join(', ')}.`);
  }
  return status as RunStatus;
}

/** A new run's column values, checked; the store adds its own existence checks (build, schedule) and the time. */
export interface CheckedNewRun {
  buildId: number;
  kind: RunKind;
  requestJson: string;
  planJson: string;
  /** The plan's step count, kept beside the run so lists need not read the plan. */
  plannedCount: number;
  softwareVersion: string;
  benchJson: string;
  operator: string;
  notes: string;
  simulated: boolean;
  scheduleId: number | null;
  benchName: string;
}

export function checkNewRun(input: NewRun): CheckedNewRun {
  return {
    buildId: requireId(input.buildId, 'run.buildId'),
    kind: checkRunKind(input),
    requestJson: toJson(input.request, 'run.request'),
    planJson: toJson(input.plan, 'run.plan'),
    plannedCount: Array.isArray(input.plan?.steps) ? input.plan.steps.length : 0,
    softwareVersion: requireText(input.softwareVersion, 'run.softwareVersion'),
    benchJson: toJson(input.bench ?? [], 'run.bench'),
    operator: requireText(input.operator ?? '', 'run.operator'),
    notes: requireText(input.notes ?? '', 'run.notes'),
    simulated: input.simulated === true,
    scheduleId: input.scheduleId == null ? null : requireId(input.scheduleId, 'run.scheduleId'),
    benchName: checkRunBenchName(input.benchName),
  };
}

export interface CheckedRunFilter {
  status: RunStatus | null;
  buildId: number | null;
  /** A LIKE pattern (see likePattern), or null for no text filter. */
  search: string | null;
  /** Exact bench name, or null for every bench. */
  bench: string | null;
  limit: number;
}

export function checkRunFilter(filter: RunFilter): CheckedRunFilter {
  const status = filter.status === undefined ? null : checkRunStatus(filter.status, 'filter.status');
  const limit = filter.limit ?? DEFAULT_LIST_LIMIT;
  if (!Number.isInteger(limit) || limit <= 0) throw new ValidationError('filter.limit', `${limit} is not a positive whole number`);
  const search = filter.search?.trim() ? likePattern(filter.search.trim()) : null;
  const buildId = filter.buildId === undefined ? null : requireId(filter.buildId, 'filter.buildId');
  const bench = filter.bench === undefined ? null : requireText(filter.bench, 'filter.bench').trim();
  return { status, buildId, search, bench, limit };
}

/** A point's first problem as both stores refuse it (the field, what is wrong, a hint), or undefined when it is fine. */
function pointProblem(point: NewPoint): { field: string; message: string; hint?: string } | undefined {
  if (!Number.isInteger(point.step) || point.step < 0) return { field: 'step', message: `${point.step} is not a whole number ≥ 0` };
  if (typeof point.stimulus !== 'number' || !Number.isFinite(point.stimulus)) return { field: 'stimulus', message: `${point.stimulus} is not a finite number` };
  if (typeof point.amplitudeVpp !== 'number' || !Number.isFinite(point.amplitudeVpp)) return { field: 'amplitudeVpp', message: `${point.amplitudeVpp} is not a finite number` };
  if (!Number.isInteger(point.flags) || point.flags < 0) return { field: 'flags', message: `${point.flags} is not a flag set` };
  if (point.measuredAt !== undefined && !Number.isFinite(Date.parse(point.measuredAt))) {
    return { field: 'measuredAt', message: `"${point.measuredAt}" is not a date and time`, hint: 'Use ISO 8601, e.g. 2026-12-01T16:45:00.000Z.' };
  }
  return undefined;
}

export function checkPoint(point: NewPoint, where: string): void {
  const problem = pointProblem(point);
  if (problem) throw new ValidationError(`${where}.${problem.field}`, problem.message, problem.hint);
}

/**
 * Every point of a list, refused as `where[index].field`. The path is made only for the point refused:
 * a bulk insert of a million points builds no million strings (it cost about a tenth of the insert).
 */
export function checkPoints(points: readonly NewPoint[], where: string): void {
  for (let index = 0; index < points.length; index++) {
    const problem = pointProblem(points[index]);
    if (problem) throw new ValidationError(`${where}[${index}].${problem.field}`, problem.message, problem.hint);
  }
}

/** A noise record as both stores accept it; returns its PSD as bytes (little-endian float64) or null. */
export function checkNoiseRecord(record: NewNoiseRecord, where: string): Uint8Array | null {
  if (!Number.isInteger(record.step) || record.step < 0) throw new ValidationError(`${where}.step`, `${record.step} is not a whole number ≥ 0`);
  if (!Number.isInteger(record.segments) || record.segments < 0) throw new ValidationError(`${where}.segments`, `${record.segments} is not a whole number ≥ 0`);
  if (!(record.degreesOfFreedom >= 0)) throw new ValidationError(`${where}.degreesOfFreedom`, `${record.degreesOfFreedom} is not a number ≥ 0`);
  if (!Number.isInteger(record.flags) || record.flags < 0) throw new ValidationError(`${where}.flags`, `${record.flags} is not a flag set`);
  if (record.measuredAt !== undefined && !Number.isFinite(Date.parse(record.measuredAt))) {
    throw new ValidationError(`${where}.measuredAt`, `"${record.measuredAt}" is not a date and time`, 'Use ISO 8601, e.g. 2026-12-01T16:45:00.000Z.');
  }
  if (record.psdV2PerHz === undefined) return null;
  const psd = record.psdV2PerHz;
  for (let i = 0; i < psd.length; i++) {
    if (!(psd[i] >= 0) || !Number.isFinite(psd[i])) throw new ValidationError(`${where}.psdV2PerHz[${i}]`, `${psd[i]} is not a power density (finite, ≥ 0)`);
  }
  return float64Bytes(psd);
}

/** One record of stored noise records as a new one (a copy between stores writes it again). */
export function noiseRecordAt(records: StoredNoiseRecords, i: number): NewNoiseRecord {
  return {
    step: records.step[i],
    sampleRateHz: records.sampleRateHz[i],
    segments: records.segments[i],
    degreesOfFreedom: records.degreesOfFreedom[i],
    ...(records.psdV2PerHz[i] ? { psdV2PerHz: records.psdV2PerHz[i]! } : {}),
    rmsV: records.rmsV[i],
    meanV: records.meanV[i],
    flags: records.flags[i],
    measuredAt: records.measuredAt[i],
  };
}

/** Little-endian IEEE 754 doubles, the stored form of a PSD whatever the machine's byte order. */
export function float64Bytes(values: ArrayLike<number>): Uint8Array {
  const bytes = new Uint8Array(values.length * 8);
  const view = new DataView(bytes.buffer);
  for (let i = 0; i < values.length; i++) view.setFloat64(i * 8, values[i], true);
  return bytes;
}

export function checkEventLevel(level: unknown): RunEvent['level'] {
  if (!EVENT_LEVELS.has(level as RunEvent['level'])) throw new ValidationError('event.level', `"${String(level)}" is not info, warning or error`);
  return level as RunEvent['level'];
}

/**
 * A calibration's values, checked, in the calibrations table's column order:
 * bench_key, bench_json, frequencies_hz_json, gain_db_json, phase_deg_json, notes.
 */
export function checkCalibration(input: NewCalibration): [instrumentPairKey: string, benchJson: string, frequenciesHzJson: string, gainDbJson: string, phaseDegJson: string, notes: string] {
  const instrumentPairKey = requireText(input.instrumentPairKey, 'calibration.instrumentPairKey');
  if (instrumentPairKey.length === 0) throw new ValidationError('calibration.instrumentPairKey', 'is empty');
  const n = input.frequencyHz?.length ?? 0;
  if (n === 0) throw new ValidationError('calibration.frequencyHz', 'is empty', 'A calibration needs at least one frequency.');
  if (input.gainDb?.length !== n || input.phaseDeg?.length !== n) {
    throw new ValidationError('calibration', `frequencyHz has ${n} entries but gainDb has ${input.gainDb?.length} and phaseDeg ${input.phaseDeg?.length}`);
  }
  input.frequencyHz.forEach((f, i) => requireFinite(f, `calibration.frequencyHz[${i}]`));
  input.gainDb.forEach((g, i) => requireFinite(g, `calibration.gainDb[${i}]`));
  input.phaseDeg.forEach((p, i) => requireFinite(p, `calibration.phaseDeg[${i}]`));
  return [
    instrumentPairKey,
    toJson(input.bench ?? [], 'calibration.bench'),
    JSON.stringify(Array.from(input.frequencyHz)),
    JSON.stringify(Array.from(input.gainDb)),
    JSON.stringify(Array.from(input.phaseDeg)),
    input.notes ?? '',
  ];
}

export function checkSchedule(input: NewSchedule): { count: number | null; until: string | null } {
  if (!(Number.isFinite(input.everyMinutes) && input.everyMinutes > 0)) {
    throw new ValidationError('schedule.everyMinutes', `${input.everyMinutes} is not a positive number of minutes`);
  }
  const count = input.count ?? null;
  const until = input.until ?? null;
  if (count === null && until === null) {
    throw new ValidationError('schedule', 'has neither a run count nor an end time', 'Give a count of runs, an end time, or both.');
  }
  if (count !== null && !(Number.isInteger(count) && count > 0)) throw new ValidationError('schedule.count', `${count} is not a positive whole number`);
  if (until !== null && Number.isNaN(Date.parse(until))) throw new ValidationError('schedule.until', `"${until}" is not a date and time`, 'Use ISO 8601, e.g. 2026-12-02T06:00:00Z.');
  return { count, until };
}

export function checkBenchKey(benchKey: unknown): string {
  const key = requireText(benchKey, 'benchKey');
  if (key.length === 0) throw new ValidationError('benchKey', 'is empty');
  return key;
}

export function checkBenchSettings(settings: BenchSettingsInput): BenchSettingsInput {
  const maxStimulusVpp = settings.maxStimulusVpp;
  if (maxStimulusVpp !== null && !(typeof maxStimulusVpp === 'number' && Number.isFinite(maxStimulusVpp) && maxStimulusVpp > 0)) {
    throw new ValidationError('benchSettings.maxStimulusVpp', `${maxStimulusVpp} is not a positive amplitude`, 'Give the largest peak-to-peak voltage the circuit may see, e.g. 2, or null to clear it.');
  }
  return { maxStimulusVpp };
}

/** The owner a conditional write names (null: an unconditional write). */
export function checkOwnerCondition(condition: OwnerCondition | undefined): string | null {
  if (condition === undefined) return null;
  if (typeof condition?.asOwner !== 'string' || condition.asOwner.trim() === '') throw new ValidationError('condition.asOwner', 'must be a non-empty owner id');
  return condition.asOwner;
}

/** A claimant as both stores accept it: a non-empty owner id, a positive pid, a host and a label. */
export function checkRunClaimant(claimant: RunClaimant, staleAfterMs: number): RunClaimant {
  if (typeof claimant?.ownerId !== 'string' || claimant.ownerId.trim() === '') throw new ValidationError('claimant.ownerId', 'must be a non-empty text');
  if (!Number.isInteger(claimant.pid) || claimant.pid <= 0) throw new ValidationError('claimant.pid', 'must be a positive whole number');
  if (typeof claimant.host !== 'string' || claimant.host === '') throw new ValidationError('claimant.host', 'must be a non-empty text');
  if (typeof claimant.label !== 'string') throw new ValidationError('claimant.label', 'must be a text');
  checkStaleAfter(staleAfterMs);
  return claimant;
}

export function checkStaleAfter(staleAfterMs: number): number {
  if (!Number.isFinite(staleAfterMs) || staleAfterMs <= 0) throw new ValidationError('staleAfterMs', 'must be a positive number of milliseconds');
  return staleAfterMs;
}

/** RFC 4122 text form (8-4-4-4-12 hex digits), the form both stores keep a uid in. */
const UID_FORM = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

/** Stable ids as lower-case UUID text; anything else is refused naming it. */
export function checkUids(uids: readonly string[]): string[] {
  return uids.map((uid, index) => {
    const text = typeof uid === 'string' ? uid.toLowerCase() : '';
    if (!UID_FORM.test(text)) throw new ValidationError(`uids[${index}]`, `"${String(uid)}" is not a UUID`, 'Stable ids are RFC 4122 UUIDs, e.g. 0b7a6c9e-2f4d-4a51-9c3e-8d1f2a3b4c5d.');
    return text;
  });
}

/** An ISO 8601 instant (any offset) as UTC text; anything else is refused naming `where`. */
export function checkInstant(text: string, where: string): string {
  const ms = Date.parse(text);
  if (typeof text !== 'string' || Number.isNaN(ms)) throw new ValidationError(where, `"${text}" is not a date and time`, 'Use ISO 8601, e.g. 2026-12-02T06:00:00Z.');
  return new Date(ms).toISOString();
}

/** An offline period with both ends ISO 8601 instants (UTC text) and from ≤ to. */
export function checkOfflinePeriod(period: OfflinePeriod): OfflinePeriod {
  const from = checkInstant(period?.from, 'offlinePeriod.from');
  const to = checkInstant(period?.to, 'offlinePeriod.to');
  if (to < from) throw new ValidationError('offlinePeriod', `ends (${period.to}) before it begins (${period.from})`);
  return { from, to };
}

/** What importRuns checks before any row is written, the same in both stores. */
export function checkRunImports(runs: readonly RunImport[]): void {
  runs.forEach(({ run, points, noiseRecords }, r) => {
    checkUids([run.uid]);
    checkRunKind(run);
    checkRunStatus(run.status);
    checkPoints(points, `runs[${r}].points`);
    noiseRecords?.step.forEach((_, index) => checkNoiseRecord(noiseRecordAt(noiseRecords, index), `runs[${r}].noiseRecords[${index}]`));
  });
}
