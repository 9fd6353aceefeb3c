/**
 * The contract's closed lists: run kinds and states, instrument roles, the
 * levels of a run's log lines, record formats. Each is one list, its type and its schema, shared by what callers
 * send and what the service sends back.
 */
import { oneOf } from './field-schemas';

/** Every kind of run: a frequency sweep, a DC transfer sweep, or a noise run (generator off, the output's noise recorded). */
export const RUN_KINDS = ['ac', 'dc', 'noise'] as const;
export type RunKind = (typeof RUN_KINDS)[number];
/** The kinds that sweep a stimulus (SweepRequest); a noise run has its own request (NoiseRequest). */
export type SweepKind = Exclude<RunKind, 'noise'>;
export const SWEEP_KINDS = RUN_KINDS.filter((kind): kind is SweepKind => kind !== 'noise');

/** Every state a run can be in, in the order a run passes through them. */
export const RUN_STATUSES = ['planned', 'running', 'paused', 'done', 'stopped', 'failed'] as const;
export type RunStatus = (typeof RUN_STATUSES)[number];
/** The states a run never leaves: nothing drives it any more (it has no owner, app/service/run-ownership.ts). */
export const FINISHED_RUN_STATUSES: ReadonlySet<RunStatus> = new Set(['done', 'stopped', 'failed']);

/** Every instrument role, in the order a bench lists them. */
export const INSTRUMENT_ROLES = ['generator', 'meter', 'scope'] as const;
export type InstrumentRole = (typeof INSTRUMENT_ROLES)[number];

/** How serious a line of a run's log is. */
export const RUN_EVENT_LEVELS = ['info', 'warning', 'error'] as const;
export type RunEventLevel = (typeof RUN_EVENT_LEVELS)[number];

export const RECORD_FORMATS = ['pdf', 'html', 'csv', 'json'] as const;
export type RecordFormat = (typeof RECORD_FORMATS)[number];

export const RunKindSchema = oneOf(RUN_KINDS);
export const SweepKindSchema = oneOf(SWEEP_KINDS);
export const RunStatusSchema = oneOf(RUN_STATUSES);
export const InstrumentRoleSchema = oneOf(INSTRUMENT_ROLES);
export const RecordFormatSchema = oneOf(RECORD_FORMATS);
export const RunEventLevelSchema = oneOf(RUN_EVENT_LEVELS);
