/**
 * What the service sends back about runs, apart from a whole run's detail
 * (contract.ts, which holds the request it echoes; noise.ts for a noise run):
 * a planned sweep, the columns of points and theory, a run's summary, owner,
 * events and progress, an exported record. Schemas first (reply-fields.ts),
 * types inferred.
 */
import * as v from 'valibot';
import { oneOf, storeId, trueOrFalse } from './field-schemas';
import { RunEventLevelSchema, RunKindSchema, RunStatusSchema } from './enumerations';
import { absentOr, count, countColumn, instant, listOf, nullOr, quantity, quantityColumn, replyObject, replyText, textColumn } from './reply-fields';

export const PlannedStepSchema = replyObject({
  index: count,
  /** Hz for AC, volts for DC. */
  stimulus: quantity,
  amplitudeVpp: quantity,
  settleS: quantity,
  integrateS: quantity,
});
export type PlannedStep = v.InferOutput<typeof PlannedStepSchema>;

export const SWEEP_PLAN_SUMMARY_FIELDS = {
  steps: listOf(PlannedStepSchema),
  estimatedDurationS: quantity,
  warnings: listOf(replyText),
};
export const SweepPlanSummarySchema = replyObject(SWEEP_PLAN_SUMMARY_FIELDS);
export type SweepPlanSummary = v.InferOutput<typeof SweepPlanSummarySchema>;

/** Columnar points of a run: index i of every array is one point. Missing values are NaN (null after JSON). */
export const PointColumnsSchema = replyObject({
  step: countColumn,
  /** Hz (AC) or input volts (DC). */
  stimulus: quantityColumn,
  amplitudeVpp: quantityColumn,
  gainDb: quantityColumn,
  gainUncertaintyDb: quantityColumn,
  phaseDeg: quantityColumn,
  phaseUncertaintyDeg: quantityColumn,
  /** DC runs: output volts. */
  outputV: quantityColumn,
  /** Bit flags, see PointFlag. */
  flags: countColumn,
  measuredAt: textColumn,
});
export type PointColumns = v.InferOutput<typeof PointColumnsSchema>;

export const TheoryColumnsSchema = replyObject({
  frequencyHz: quantityColumn,
  gainDb: quantityColumn,
  phaseDeg: quantityColumn,
  idealGainDb: quantityColumn,
  idealPhaseDeg: quantityColumn,
  bandLowDb: absentOr(quantityColumn),
  bandHighDb: absentOr(quantityColumn),
});
export type TheoryColumns = v.InferOutput<typeof TheoryColumnsSchema>;

/** The process that drives a run, as the service sees it when it answers. */
export const RunOwnerSchema = replyObject({
  /** What drives it, for people: "rolloff (command line)", "rolloff serve", "the desktop window". */
  label: replyText,
  pid: count,
  host: replyText,
  /** ISO 8601: when it took the run, and its latest heartbeat. */
  since: instant,
  heartbeatAt: instant,
  /** Whole seconds from the heartbeat to the moment the service answered, by the service's clock. */
  heartbeatAgeS: quantity,
  /** false when the heartbeat is stale or, on the service's host, the process is gone: nobody drives the run any more. */
  live: trueOrFalse,
});
export type RunOwner = v.InferOutput<typeof RunOwnerSchema>;

export const RUN_SUMMARY_FIELDS = {
  id: storeId,
  /** Stable identity (a UUID made when the run was created), the same in every store it is copied to. */
  uid: replyText,
  buildId: storeId,
  buildLabel: replyText,
  designName: replyText,
  kind: RunKindSchema,
  status: RunStatusSchema,
  startedAt: nullOr(instant),
  endedAt: nullOr(instant),
  pointCount: count,
  plannedCount: count,
  simulated: trueOrFalse,
  /** The bench that drove the run; '' for runs stored before benches had names. */
  benchName: replyText,
  /** The process that has claimed the run (while it is driven, or left behind by one that died); null when none has. */
  owner: nullOr(RunOwnerSchema),
};
export const RunSummarySchema = replyObject(RUN_SUMMARY_FIELDS);
export type RunSummary = v.InferOutput<typeof RunSummarySchema>;

/** A time the bench driving a run could not reach its store and kept the points in its local outbox (ISO 8601 instants). */
export const OfflinePeriodSchema = replyObject({
  from: instant,
  to: instant,
});
export type OfflinePeriod = v.InferOutput<typeof OfflinePeriodSchema>;

export const RUN_EVENT_FIELDS = {
  at: instant,
  level: RunEventLevelSchema,
  message: replyText,
};
export const RunEventSchema = replyObject(RUN_EVENT_FIELDS);
export type RunEvent = v.InferOutput<typeof RunEventSchema>;

export const ExportedRecordSchema = replyObject({
  fileName: replyText,
  mimeType: replyText,
  /** Base64 for PDF, text otherwise. */
  content: replyText,
  encoding: oneOf(['base64', 'utf8'] as const),
});
export type ExportedRecord = v.InferOutput<typeof ExportedRecordSchema>;

export const RunProgressSchema = replyObject({
  runId: storeId,
  step: count,
  total: count,
  etaS: quantity,
  status: RunStatusSchema,
});
export type RunProgress = v.InferOutput<typeof RunProgressSchema>;
