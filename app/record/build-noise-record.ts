/**
 * NoiseRunDetail (from the service) + design and build → NoiseRunRecord, the
 * boundary where a noise run becomes a record: columns checked for length,
 * non-finite numbers made null (as buildRunRecord does for sweeps).
 */
import { ValidationError } from '../errors';
import type { NoiseRunDetail } from '../contract/contract';
import { SAFETY_NOTICE_POINTS } from '../contract/safety';
import { SOFTWARE_VERSION } from '../contract/version';
import { column, jsonSafe, measuredOn, type RunRecordContext } from './build-run-record';
import { noiseRunDigest } from './digest';
import { RECORD_FORMAT_VERSION, type NoiseRunRecord, type RecordNoiseDensity, type RecordNoiseRecords } from './model';

export function buildNoiseRunRecord(detail: NoiseRunDetail, context: Omit<RunRecordContext, 'dcFit'>): NoiseRunRecord {
  const where = `run ${detail?.id}`;
  if (!detail || detail.kind !== 'noise') throw new ValidationError('run', 'no noise run detail was given');
  if (!context?.build) throw new ValidationError(`${where}.build`, 'the build of the run is missing');
  if (context.build.id !== detail.buildId) throw new ValidationError(`${where}.build`, `build ${context.build.id} was given but the run belongs to build ${detail.buildId}`);
  const records = normaliseRecords(detail.records, `${where}.records`);
  const density = normaliseDensity(detail.density, `${where}.density`);
  const body = {
    run: {
      id: detail.id,
      uid: detail.uid,
      kind: 'noise' as const,
      status: detail.status,
      startedAt: detail.startedAt ?? null,
      endedAt: detail.endedAt ?? null,
      operator: detail.request.operator ?? '',
      notes: detail.request.notes ?? '',
      simulated: Boolean(detail.simulated),
      softwareVersion: detail.softwareVersion ?? 'unknown',
      pointCount: records.step.length,
      plannedCount: detail.plannedCount,
      plan: detail.request,
      acquisition: detail.acquisition,
      offlinePeriods: (detail.offlinePeriods ?? []).map((period) => ({ from: period.from, to: period.to })),
    },
    ...measuredOn(detail, context),
    records,
    density,
  };
  return jsonSafe({
    recordType: 'noise-run',
    formatVersion: RECORD_FORMAT_VERSION,
    title: `Output noise of ${context.build.label} (run ${detail.id})`,
    generatedAt: context.generatedAt ?? new Date().toISOString(),
    generatedBy: `Rolloff ${SOFTWARE_VERSION}`,
    safetyNotice: [...SAFETY_NOTICE_POINTS],
    ...body,
    figures: detail.figures.noise ?? null,
    events: detail.events ?? [],
    digest: noiseRunDigest(jsonSafe(body)),
  }) as NoiseRunRecord;
}

function normaliseRecords(records: NoiseRunDetail['records'], where: string): RecordNoiseRecords {
  if (!records || !Array.isArray(records.step)) throw new ValidationError(where, 'the records of the run are missing');
  const n = records.step.length;
  const whole = (values: number[], name: string) => column(values, n, `${where}.${name}`).map((v) => v ?? 0);
  if (!Array.isArray(records.measuredAt) || records.measuredAt.length !== n) throw new ValidationError(`${where}.measuredAt`, `does not have ${n} entries`);
  return {
    step: whole(records.step, 'step'),
    sampleRateHz: column(records.sampleRateHz, n, `${where}.sampleRateHz`),
    segments: whole(records.segments, 'segments'),
    degreesOfFreedom: whole(records.degreesOfFreedom, 'degreesOfFreedom'),
    rmsV: column(records.rmsV, n, `${where}.rmsV`),
    meanV: column(records.meanV, n, `${where}.meanV`),
    flags: whole(records.flags, 'flags'),
    measuredAt: records.measuredAt.map(String),
  };
}

function normaliseDensity(density: NoiseRunDetail['density'], where: string): RecordNoiseDensity {
  const n = density?.frequencyHz?.length ?? 0;
  const at = (values: number[], name: string) => column(values, n, `${where}.${name}`);
  return {
    frequencyHz: at(density.frequencyHz, 'frequencyHz'),
    measuredVPerRtHz: at(density.measuredVPerRtHz, 'measuredVPerRtHz'),
    uncertaintyVPerRtHz: at(density.uncertaintyVPerRtHz, 'uncertaintyVPerRtHz'),
    low95VPerRtHz: at(density.low95VPerRtHz, 'low95VPerRtHz'),
    high95VPerRtHz: at(density.high95VPerRtHz, 'high95VPerRtHz'),
    computedVPerRtHz: at(density.computedVPerRtHz, 'computedVPerRtHz'),
  };
}
