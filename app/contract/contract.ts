/**
 * The one API contract between the window (renderer) and the service. The
 * Electron preload bridge and the headless web host both carry exactly these
 * methods and events, so the renderer never knows which one it talks to.
 *
 * Schema-first: what a caller sends (the arguments of every method) and what
 * the service sends back (what every method resolves to, every event) are
 * valibot schemas, and their TypeScript types are inferred from them, so the
 * type and the check at every boundary are one text. The hosts check calls
 * with API_ARGUMENTS (check-call.ts); the window checks replies and events
 * with API_RESULTS and SERVICE_EVENT_SCHEMAS (check-reply.ts). Why valibot:
 * field-schemas.ts. The replies' schemas are in files of their own by
 * concern (bench-results.ts, design-results.ts, run-results.ts,
 * run-figures.ts, noise.ts, store-choice.ts, event-schemas.ts) and re-exported
 * here; a run's detail, which echoes its request, is here.
 *
 * Pure: imports only valibot (no node:*, Electron or DOM). Data crossing the
 * boundary is plain JSON; numeric series are arrays of numbers in columnar
 * form ([xs, ys, …]) so they go straight into uPlot.
 *
 * Extend it when a view needs something new; every method must also be
 * reachable from the CLI.
 */
import * as v from 'valibot';
import {
  LIMITS,
  checkFirst,
  fieldFirst,
  fieldRule,
  fields,
  finiteNumber,
  maxStimulusRecorded,
  maxStimulusSetByService,
  numberRecord,
  oneOf,
  optional,
  describeValue,
  plainObject,
  positiveNumber,
  shortText,
  storeId,
  text,
  trueOrFalse,
  wholeNumber,
  withDefault,
  withHint,
} from './field-schemas';
import { InstrumentRoleSchema, RecordFormatSchema, RunStatusSchema, SweepKindSchema, type InstrumentRole, type RecordFormat, type SweepKind } from './enumerations';
import { absentOr, listOf, nothing, nullOr, quantity, quantityColumn, replyObject, replyText, someOf } from './reply-fields';
import {
  BenchStatusSchema,
  InstrumentInfoSchema,
  PortListingSchema,
  ProfileCheckReportSchema,
  ProfileSummarySchema,
  type BenchStatus,
  type InstrumentInfo,
  type PortListing,
  type ProfileCheckReport,
  type ProfileSummary,
} from './bench-results';
import { BuildRecordSchema, DesignFileReplySchema, DesignRecordSchema, TemplateInfoSchema, type BuildRecord, type DesignRecord, type TemplateInfo } from './design-results';
import {
  ExportedRecordSchema,
  OfflinePeriodSchema,
  PointColumnsSchema,
  RUN_SUMMARY_FIELDS,
  RunEventSchema,
  RunSummarySchema,
  SweepPlanSummarySchema,
  TheoryColumnsSchema,
  type ExportedRecord,
  type RunSummary,
  type SweepPlanSummary,
} from './run-results';
import { RUN_FIGURE_NAMES, RunFiguresSchema, VerdictSchema } from './run-figures';
import type { ServiceEventName } from './events';
import type { ServiceEvents } from './event-schemas';
import { StoreInUseSchema, StoreLocationSchema, type StoreInUse } from './store-choice';
import { NoisePlanSummarySchema, NoiseRequestSchema, NoiseRunDetailSchema, type NoisePlanSummary, type NoiseRequest, type NoiseRunDetail } from './noise';

export const ConnectRequestSchema = fields({
  role: InstrumentRoleSchema,
  address: v.pipe(shortText(false), v.transform((address) => address.trim())),
  profileId: shortText(false),
});
export type ConnectRequest = v.InferOutput<typeof ConnectRequestSchema>;

export const ProfileCheckRequestSchema = fields({
  address: v.pipe(shortText(false), v.transform((address) => address.trim())),
  profileId: shortText(false),
});
export type ProfileCheckRequest = v.InferOutput<typeof ProfileCheckRequestSchema>;

/** The new build a caller describes (createBuild). */
export const NewBuildSchema = fields({
  designId: storeId,
  label: v.pipe(shortText(false), v.transform((label) => label.trim())),
  notes: withDefault(text(LIMITS.textChars, true), ''),
  /** Measured part values by part id, SI units. */
  actualValues: withDefault(numberRecord(positiveNumber('SI units')), {}),
});
export type NewBuild = v.InferOutput<typeof NewBuildSchema>;

export const VerdictLimitsSchema = fields({
  /** Largest allowed |measured − theory| in dB over the pass band. */
  maxDeviationDb: optional(positiveNumber('dB')),
  /** Allowed relative error of each −3 dB frequency. */
  cornerTolerance: optional(positiveNumber('relative')),
  /** Pass-band gain window in dB: [low, high]. */
  passbandGainDb: optional(
    v.pipe(
      v.custom<unknown[]>((value) => Array.isArray(value) && value.length === 2, 'must be [lowDb, highDb]'),
      v.tuple([finiteNumber, finiteNumber]),
      v.check(([low, high]) => high >= low, (issue) => `low limit ${issue.input[0]} dB is above high limit ${issue.input[1]} dB`),
    ),
  ),
});
export type VerdictLimits = v.InferOutput<typeof VerdictLimitsSchema>;

/** Fixed stimulus, or chosen per point from theory to stay linear. */
export const AmplitudeSchema = v.pipe(
  plainObject,
  checkFirst(fieldFirst('mode', oneOf(['fixed', 'auto'] as const))),
  v.lazy((input) =>
    (input as { mode: string }).mode === 'fixed'
      ? fields({ mode: v.literal('fixed'), vpp: positiveNumber('V peak-to-peak') })
      : fields({ mode: v.literal('auto'), targetOutputVpp: optional(positiveNumber('V peak-to-peak')) }),
  ),
);

const SPACINGS = ['log', 'linear'] as const;

const SWEEP_REQUEST_FIELDS = {
  buildId: storeId,
  kind: SweepKindSchema,
  /** AC: frequency limits in Hz; DC: input level limits in volts. */
  from: finiteNumber,
  to: finiteNumber,
  /** Log spacing: points per decade. */
  pointsPerDecade: wholeNumber(1, LIMITS.pointsPerDecade),
  spacing: oneOf(SPACINGS),
  /** Linear spacing: how many points from `from` to `to`. Runs stored without it had as many as the log grid would. */
  points: optional(wholeNumber(2, LIMITS.count)),
  amplitude: AmplitudeSchema,
  measurement: oneOf(['scope', 'meter'] as const),
  minCycles: wholeNumber(1, LIMITS.count),
  averages: wholeNumber(1, LIMITS.count),
  refine: trueOrFalse,
  operator: withDefault(shortText(true), ''),
  notes: withDefault(text(LIMITS.textChars, true), ''),
  /** Optional pass/fail limits. */
  limits: optional(VerdictLimitsSchema),
  /**
   * Through-calibration (meter runs): the stage is bypassed and the generator
   * measured directly; the result is stored as the bench's calibration and
   * applied to later meter runs.
   */
  through: optional(trueOrFalse),
  /**
   * The maximum stimulus in force when the run was made (Vpp). The ceiling is
   * the bench's setting: the service fills it in and records it, and a
   * caller may not pass its own.
   */
  maxStimulusVpp: maxStimulusSetByService,
};

const SWEEP_REQUEST_RULES = [
  // The range is checked before the other fields, as a reader scans a request.
  fieldFirst('kind', SweepKindSchema),
  fieldFirst('from', finiteNumber),
  fieldFirst('to', finiteNumber),
  fieldRule<{ kind: SweepKind; from: number; to: number }>(({ kind, from, to }) => {
    if (kind === 'ac') {
      if (from <= 0) return { key: 'from', message: `must be a frequency above 0 Hz, got ${from}` };
      if (to <= from) return { key: 'to', message: withHint(`must be above the start frequency (${from} Hz), got ${to}`, 'Sweeps run from low to high frequency.') };
    } else if (from === to) {
      return { key: 'to', message: withHint('must differ from the start level', 'A DC transfer sweep needs a range of input levels.') };
    }
    return undefined;
  }),
  fieldFirst('spacing', oneOf(SPACINGS)),
  fieldRule<{ kind: SweepKind; from: number; to: number; spacing: string }>(({ kind, from, to, spacing }) =>
    kind === 'dc' && spacing === 'log' && (from <= 0 || to <= 0)
      ? { key: 'from', message: withHint('log-spaced input levels must be above 0 V', 'Use linear spacing for ranges that cross zero.') }
      : undefined,
  ),
  fieldRule<{ spacing: string; points?: number }>(({ spacing, points }) =>
    spacing === 'log' && points !== undefined
      ? { key: 'points', message: withHint('applies to linear spacing only', 'A log sweep takes pointsPerDecade.') }
      : undefined,
  ),
];

export const SweepRequestSchema = fields(SWEEP_REQUEST_FIELDS, SWEEP_REQUEST_RULES);
export type SweepRequest = v.InferOutput<typeof SweepRequestSchema>;

/** A sweep's request as the service stored it and sends it back (RunDetail): as it was taken, with the maximum stimulus it recorded. */
export const SweepRequestAsRunSchema = fields({ ...SWEEP_REQUEST_FIELDS, maxStimulusVpp: maxStimulusRecorded }, SWEEP_REQUEST_RULES);

/** How a run is resumed (resumeRun). */
export const ResumeRequestSchema = fields({
  /**
   * For a run of another bench: that bench's name, repeated to confirm this bench
   * takes the run over (app/contract/bench-take-over.ts); refused when it is not the run's bench.
   */
  takeOverFromBench: optional(v.pipe(shortText(false), v.transform((name) => name.trim()))),
});
export type ResumeRequest = v.InferOutput<typeof ResumeRequestSchema>;

/** The History view's filter (listRuns). */
export const RunFilterSchema = fields({
  search: optional(shortText(true)),
  status: optional(RunStatusSchema),
  buildId: optional(storeId),
  /** Only the runs of this bench (exact name, as `rolloff runs --bench` takes it). */
  bench: optional(shortText(false)),
});
export type RunFilter = v.InferOutput<typeof RunFilterSchema>;

/** A design file as saved; its circuit (nodes, values) is checked by the circuit parser. */
export const DesignSchema = v.pipe(
  plainObject,
  checkFirst((input) =>
    Array.isArray(input.parts)
      ? undefined
      : { key: 'parts', message: withHint('must be a list of parts', 'A design file lists its parts by nodes; see the templates for examples.') },
  ),
  v.check(
    (design) => JSON.stringify(design).length <= LIMITS.designJsonChars,
    (issue) => `is ${JSON.stringify(issue.input).length} characters of JSON; at most ${LIMITS.designJsonChars} are accepted`,
  ),
);

/** A list of distinct runs (compare, export). */
export const RunIdListSchema = v.pipe(
  v.array(v.unknown(), (issue) => `must be a list of run ids, got ${describeValue(issue.input)}`),
  v.minLength(1, withHint('must name at least one run', 'Pick one or more runs first.')),
  v.maxLength(LIMITS.runsPerCall, (issue) => `names ${issue.input.length} runs; at most ${LIMITS.runsPerCall} are accepted`),
  v.array(storeId),
  v.check((ids) => new Set(ids).size === ids.length, 'names the same run more than once'),
);

/** What a comparison is measured against: one of the runs, or the theory. */
export const ComparisonReferenceSchema = v.lazy((input) => (input === 'theory' ? v.literal('theory') : storeId));

/** The bits of a point's flags (PointColumns.flags). */
export const PointFlag = {
  distorted: 1,
  overrange: 2,
  notANumber: 4,
  outsideToleranceBand: 8,
  retried: 16,
  refinement: 32,
  pastGainLimit: 64,
} as const;

/** A sweep run (AC or DC) with its points, theory and figures; a noise run's is NoiseRunDetail (getNoiseRun). */
export const RunDetailSchema = replyObject({
  ...RUN_SUMMARY_FIELDS,
  kind: SweepKindSchema,
  request: SweepRequestAsRunSchema,
  bench: listOf(InstrumentInfoSchema),
  softwareVersion: replyText,
  points: PointColumnsSchema,
  theory: TheoryColumnsSchema,
  figures: RunFiguresSchema,
  verdict: nullOr(VerdictSchema),
  events: listOf(RunEventSchema),
  /** When the bench could not reach the store during the run, oldest first; [] when it never lost it. */
  offlinePeriods: listOf(OfflinePeriodSchema),
  theoryGainLimitHz: absentOr(quantity),
  theoryMinus3dbHz: quantityColumn,
});
export type RunDetail = v.InferOutput<typeof RunDetailSchema>;

export const ComparisonSchema = replyObject({
  runs: listOf(RunDetailSchema),
  referenceRunId: ComparisonReferenceSchema,
  /** Per run: stimulus and measured − reference, in dB. */
  differences: listOf(replyObject({ runId: storeId, stimulus: quantityColumn, deltaDb: quantityColumn })),
  figureTable: listOf(
    replyObject({ runId: storeId, label: replyText, figures: RunFiguresSchema, deltas: someOf(RUN_FIGURE_NAMES, quantity), verdict: nullOr(VerdictSchema) }),
  ),
});
export type Comparison = v.InferOutput<typeof ComparisonSchema>;

export * from './enumerations';
export * from './bench-results';
export * from './design-results';
export * from './run-results';
export * from './run-figures';
export * from './noise';
export { StoreInUseSchema, type StoreInUse, type DatabaseSource } from './store-choice';
export { SERVICE_EVENT_NAMES, type ServiceEventName } from './events';
export { SERVICE_EVENT_SCHEMAS, type ServiceEvents } from './event-schemas';

/** Every method a window may call. Arguments are validated where they arrive. */
export interface RolloffApi {
  // Bench
  listPorts(): Promise<PortListing>;
  listProfiles(): Promise<ProfileSummary[]>;
  benchStatus(): Promise<BenchStatus>;
  connect(request: ConnectRequest): Promise<InstrumentInfo>;
  disconnect(role: InstrumentRole): Promise<void>;
  startSimulatedBench(designId: number): Promise<BenchStatus>;
  setMaxStimulus(maxStimulusVpp: number): Promise<BenchStatus>;
  /** Sends each operation of a profile to the instrument at an address (output never left on) and reports per operation. */
  checkProfile(request: ProfileCheckRequest): Promise<ProfileCheckReport>;

  // Designs and builds
  listTemplates(): Promise<TemplateInfo[]>;
  makeTemplate(templateId: string, parameters: Record<string, number>): Promise<unknown>;
  saveDesign(design: unknown): Promise<DesignRecord>;
  listDesigns(): Promise<DesignRecord[]>;
  createBuild(build: NewBuild): Promise<BuildRecord>;
  listBuilds(designId?: number): Promise<BuildRecord[]>;

  // Sweeps
  planSweep(request: SweepRequest): Promise<SweepPlanSummary>;
  startRun(request: SweepRequest): Promise<RunSummary>;
  pauseRun(runId: number): Promise<RunSummary>;
  /** A run of another bench is refused (TakeOverNotConfirmedError) unless request.takeOverFromBench names it. */
  resumeRun(runId: number, request?: ResumeRequest): Promise<RunSummary>;
  stopRun(runId: number): Promise<RunSummary>;

  // Noise runs (generator held off; pause, resume and stop as for sweeps)
  planNoiseRun(request: NoiseRequest): Promise<NoisePlanSummary>;
  startNoiseRun(request: NoiseRequest): Promise<RunSummary>;

  // History, Compare, Record
  listRuns(filter?: RunFilter): Promise<RunSummary[]>;
  /** One run's summary (its kind says whether getRun or getNoiseRun reads it). */
  getRunSummary(runId: number): Promise<RunSummary>;
  /** A sweep run; a noise run is refused with a hint to getNoiseRun. */
  getRun(runId: number): Promise<RunDetail>;
  getNoiseRun(runId: number): Promise<NoiseRunDetail>;
  compareRuns(runIds: number[], reference: number | 'theory'): Promise<Comparison>;
  exportRecord(runIds: number[], format: RecordFormat): Promise<ExportedRecord>;

  // Store (answered by the host, which reopens the service on another store; the CLI takes --db)
  storeInUse(): Promise<StoreInUse>;
  /** Reopens the service on a SQLite file or a lab store's address; refused while a run of this service is active. */
  chooseStore(location: string): Promise<StoreInUse>;
}

/** The methods the host answers itself rather than the service (app/host/hosted-service.ts). */
export type StoreChoiceMethodName = 'storeInUse' | 'chooseStore';
/** What the service itself implements: the contract without the store choice. */
export type ServiceApi = Omit<RolloffApi, StoreChoiceMethodName>;

export type RolloffMethodName = keyof RolloffApi;

/** The client a view uses: the API plus event subscription. */
export interface RolloffClient extends RolloffApi {
  on<E extends ServiceEventName>(event: E, listener: (payload: ServiceEvents[E]) => void): () => void;
}

/** One positional argument of a method: its name (for messages), its schema, and whether it may be left out. */
export interface ArgumentSpec {
  name: string;
  schema: v.GenericSchema;
  /** 'required': absent or null is refused; 'optional': left out when absent; else the default used when absent. */
  presence: 'required' | 'optional' | { default: unknown };
}

const required = (name: string, schema: v.GenericSchema): ArgumentSpec => ({ name, schema, presence: 'required' });
const optionalArgument = (name: string, schema: v.GenericSchema): ArgumentSpec => ({ name, schema, presence: 'optional' });

/**
 * The arguments of every method, as schemas. Its type requires one entry per
 * method of RolloffApi, so a method added to the contract cannot be called
 * before its arguments are checked.
 */
export const API_ARGUMENTS: { readonly [M in RolloffMethodName]: readonly ArgumentSpec[] } = {
  listPorts: [],
  listProfiles: [],
  benchStatus: [],
  connect: [required('request', ConnectRequestSchema)],
  disconnect: [required('role', InstrumentRoleSchema)],
  startSimulatedBench: [required('designId', storeId)],
  setMaxStimulus: [required('maxStimulusVpp', positiveNumber('V peak-to-peak'))],
  checkProfile: [required('request', ProfileCheckRequestSchema)],
  listTemplates: [],
  makeTemplate: [required('templateId', shortText(false)), { name: 'parameters', schema: numberRecord(finiteNumber), presence: { default: {} } }],
  saveDesign: [required('design', DesignSchema)],
  listDesigns: [],
  createBuild: [required('build', NewBuildSchema)],
  listBuilds: [optionalArgument('designId', storeId)],
  planSweep: [required('request', SweepRequestSchema)],
  startRun: [required('request', SweepRequestSchema)],
  pauseRun: [required('runId', storeId)],
  resumeRun: [required('runId', storeId), optionalArgument('request', ResumeRequestSchema)],
  stopRun: [required('runId', storeId)],
  planNoiseRun: [required('request', NoiseRequestSchema)],
  startNoiseRun: [required('request', NoiseRequestSchema)],
  listRuns: [optionalArgument('filter', RunFilterSchema)],
  getRunSummary: [required('runId', storeId)],
  getRun: [required('runId', storeId)],
  getNoiseRun: [required('runId', storeId)],
  compareRuns: [required('runIds', RunIdListSchema), required('reference', ComparisonReferenceSchema)],
  exportRecord: [required('runIds', RunIdListSchema), required('format', RecordFormatSchema)],
  storeInUse: [],
  chooseStore: [required('location', StoreLocationSchema)],
};

/**
 * What every method resolves to, as schemas: the window checks each reply
 * against its method's entry (check-reply.ts) before a view sees it. Its type
 * requires one entry per method of RolloffApi, each of exactly the type the
 * method declares, so a method added to the contract, or a type changed,
 * cannot go unchecked.
 */
export const API_RESULTS: { readonly [M in RolloffMethodName]: v.GenericSchema<unknown, Awaited<ReturnType<RolloffApi[M]>>> } = {
  listPorts: PortListingSchema,
  listProfiles: listOf(ProfileSummarySchema),
  benchStatus: BenchStatusSchema,
  connect: InstrumentInfoSchema,
  disconnect: nothing,
  startSimulatedBench: BenchStatusSchema,
  setMaxStimulus: BenchStatusSchema,
  checkProfile: ProfileCheckReportSchema,
  listTemplates: listOf(TemplateInfoSchema),
  makeTemplate: DesignFileReplySchema,
  saveDesign: DesignRecordSchema,
  listDesigns: listOf(DesignRecordSchema),
  createBuild: BuildRecordSchema,
  listBuilds: listOf(BuildRecordSchema),
  planSweep: SweepPlanSummarySchema,
  startRun: RunSummarySchema,
  pauseRun: RunSummarySchema,
  resumeRun: RunSummarySchema,
  stopRun: RunSummarySchema,
  planNoiseRun: NoisePlanSummarySchema,
  startNoiseRun: RunSummarySchema,
  listRuns: listOf(RunSummarySchema),
  getRunSummary: RunSummarySchema,
  getRun: RunDetailSchema,
  getNoiseRun: NoiseRunDetailSchema,
  compareRuns: ComparisonSchema,
  exportRecord: ExportedRecordSchema,
  storeInUse: StoreInUseSchema,
  chooseStore: StoreInUseSchema,
};
