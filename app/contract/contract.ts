/**
 * The one API contract between the window (renderer) and the service. The
 * Electron preload bridge and the headless web host both carry exactly these
 * methods and events, so the renderer never knows which one it talks to.
 *
 * Schema-first: what a caller sends (the arguments of every method) is a
 * valibot schema here, and its TypeScript type is inferred from it, so the
 * type and the check at every boundary are one text (check-call.ts applies
 * them; field-schemas.ts says why valibot). What the service sends back is
 * typed below and produced by our own code, so it is not checked again.
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
import type { ServiceEventName, ServiceEvents } from './events';
import { StoreLocationSchema, type StoreInUse } from './store-choice';
import { NoiseRequestSchema, type NoiseFigures, type NoisePlanSummary, type NoiseRequest, type NoiseRunDetail } from './noise';

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

export const RunKindSchema = oneOf(RUN_KINDS);
const SweepKindSchema = oneOf(SWEEP_KINDS);
export const RunStatusSchema = oneOf(RUN_STATUSES);
export const InstrumentRoleSchema = oneOf(INSTRUMENT_ROLES);

export interface PortInfo {
  path: string;
  /** What is behind the path: a serial port, or a USBTMC instrument bound by the kernel's usbtmc driver. */
  kind?: 'serial' | 'usbtmc';
  /** The address to connect with, in a form the address parser accepts (a VISA resource string). */
  address?: string;
  manufacturer?: string;
  serialNumber?: string;
  vendorId?: string;
  productId?: string;
}

/** The ports this machine offers; `incomplete` says in one line what the listing could not learn (no udev, an unreadable attribute). */
export interface PortListing {
  ports: PortInfo[];
  incomplete?: string;
}

export interface InstrumentIdentity {
  manufacturer: string;
  model: string;
  serialNumber: string;
  firmware: string;
}

export interface InstrumentInfo {
  role: InstrumentRole;
  address: string;
  profileId: string;
  identity: InstrumentIdentity;
  simulated: boolean;
}

export interface ProfileSummary {
  id: string;
  role: InstrumentRole;
  description: string;
  builtIn: boolean;
}

/** One operation of a profile check: what the instrument made of it. */
export interface OperationCheck {
  /** Operation name (e.g. "frequency", "init[1]", "channelOn (channel 2)"). */
  operation: string;
  /** The commands sent, as text. */
  commands: string;
  /** accepted; refused (with the instrument's SCPI error); timed-out; unparsed (reply not in the form the profile expects); not-checked (not sent). */
  outcome: 'accepted' | 'refused' | 'timed-out' | 'unparsed' | 'not-checked';
  errorCode?: number;
  errorMessage?: string;
  /** A short summary of a query's reply, or for an unparsed reply the bytes received. */
  received?: string;
  detail?: string;
  /** Wall time of the exchange, milliseconds. */
  replyMs: number;
}

export interface ProfileCheckReport {
  address: string;
  profileId: string;
  role: InstrumentRole;
  identity: InstrumentIdentity;
  checks: OperationCheck[];
}


/**
 * A bench as its own settings (the maximum stimulus) are kept: its name
 * (--bench, ROLLOFF_BENCH or the host name) and whether it is the simulated
 * bench the service runs. The simulated bench of a machine and its real
 * instruments are two benches here, so a limit chosen for a simulation never
 * reaches a real circuit.
 */
export interface BenchIdentity {
  name: string;
  simulated: boolean;
}

/** The maximum stimulus in force and where it came from. */
export interface StimulusLimit {
  maxStimulusVpp: number;
  /** The bench it is the setting of. */
  bench: BenchIdentity;
  /** ISO 8601: when it was saved as that bench's setting. */
  setAt: string;
  /** Saved earlier and reused now (not given in this session). */
  reused: boolean;
}

export interface BenchStatus {
  instruments: InstrumentInfo[];
  /** The user's ceiling on generator output, peak-to-peak volts; never exceeded. 0 while not set. */
  maxStimulusVpp: number;
  /** The bench whose settings are in force; absent until the service knows (no instrument connected, no simulated bench started yet). */
  bench?: BenchIdentity;
  /** Where maxStimulusVpp came from; absent while it is not set, or given but not saved yet (it is saved for the first bench used). */
  maxStimulusLimit?: StimulusLimit;
  /** Set when a simulated bench is running, with the addresses it answers on. */
  simulatedBench?: { addresses: Partial<Record<InstrumentRole, string>>; designName: string };
}

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

export interface TemplateInfo {
  id: string;
  title: string;
  description: string;
  /** Parameter names with defaults, in SI units (ohms, farads, hertz). */
  parameters: Array<{ name: string; description: string; defaultValue: number; unit: string }>;
}

/** A design as stored: the JSON design file plus its store id. */
export interface DesignRecord {
  id: number;
  /** Stable identity (a UUID made when the design was first stored), the same in every store it is copied to. */
  uid: string;
  name: string;
  /** The design file's JSON (see app/circuit for its schema). */
  design: unknown;
  createdAt: string;
}

export interface BuildRecord {
  id: number;
  /** Stable identity (a UUID made when the build was first stored), the same in every store it is copied to. */
  uid: string;
  designId: number;
  label: string;
  notes: string;
  /** Measured part values by part id, SI units. */
  actualValues: Record<string, number>;
  createdAt: string;
}

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

export const SweepRequestSchema = fields(
  {
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
    maxStimulusVpp: optional(
      v.custom<number>(
        () => false,
        withHint('is set by the service from the bench setting, not by the caller', 'Set the maximum stimulus on the Bench view (setMaxStimulus).'),
      ),
    ),
  },
  [
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
  ],
);
export type SweepRequest = v.InferOutput<typeof SweepRequestSchema>;

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

export interface PlannedStep {
  index: number;
  /** Hz for AC, volts for DC. */
  stimulus: number;
  amplitudeVpp: number;
  settleS: number;
  integrateS: number;
}

export interface SweepPlanSummary {
  steps: PlannedStep[];
  estimatedDurationS: number;
  warnings: string[];
}

/** Columnar points of a run: index i of every array is one point. */
export interface PointColumns {
  step: number[];
  /** Hz (AC) or input volts (DC). */
  stimulus: number[];
  amplitudeVpp: number[];
  gainDb: number[];
  gainUncertaintyDb: number[];
  phaseDeg: number[];
  phaseUncertaintyDeg: number[];
  /** DC runs: output volts. */
  outputV: number[];
  /** Bit flags, see PointFlag. */
  flags: number[];
  measuredAt: string[];
}

export const PointFlag = {
  distorted: 1,
  overrange: 2,
  notANumber: 4,
  outsideToleranceBand: 8,
  retried: 16,
  refinement: 32,
  pastGainLimit: 64,
} as const;

export interface TheoryColumns {
  frequencyHz: number[];
  gainDb: number[];
  phaseDeg: number[];
  idealGainDb: number[];
  idealPhaseDeg: number[];
  bandLowDb?: number[];
  bandHighDb?: number[];
}

export interface RunFigures {
  passbandGainDb?: number;
  minus3dbHz: number[];
  rolloffDbPerDecade?: number;
  gainLimitHz?: number;
  gbwEstimateHz?: number;
  gbwUncertaintyHz?: number;
  maxDeviationDb?: number;
  /** AC runs: peak of measured over ideal-op-amp gain above its low-frequency value, dB. */
  closedLoopPeakingDb?: number;
  /** Phase margin of the second-order loop with that peaking (an estimate), degrees. */
  phaseMarginEstimateDeg?: number;
  /** No peaking measured: the margin is at least phaseMarginEstimateDeg. */
  phaseMarginEstimateIsLowerBound?: boolean;
  /** Computed for the build's circuit (loop gain of the output op-amp): phase margin, degrees, and closed-loop peaking, dB. */
  theoryPhaseMarginDeg?: number;
  theoryPeakingDb?: number;
  /** Plain warnings of the computed theory for the build's circuit (e.g. a phase margin below 45°). */
  theoryWarnings?: string[];
  /** Noise runs: measured against computed over the band. */
  noise?: NoiseFigures;
  /** DC runs: fitted log-stage parameters with 95 % intervals. */
  logFit?: { n: number; nCi: [number, number]; isA: number; isCi: [number, number]; rsOhm: number; rsCi: [number, number] };
}

export interface Verdict {
  pass: boolean;
  reasons: string[];
}

/** The process that drives a run, as the service sees it when it answers. */
export interface RunOwner {
  /** What drives it, for people: "rolloff (command line)", "rolloff serve", "the desktop window". */
  label: string;
  pid: number;
  host: string;
  /** ISO 8601: when it took the run, and its latest heartbeat. */
  since: string;
  heartbeatAt: string;
  /** Whole seconds from the heartbeat to the moment the service answered, by the service's clock. */
  heartbeatAgeS: number;
  /** false when the heartbeat is stale or, on the service's host, the process is gone: nobody drives the run any more. */
  live: boolean;
}

export interface RunSummary {
  id: number;
  /** Stable identity (a UUID made when the run was created), the same in every store it is copied to. */
  uid: string;
  buildId: number;
  buildLabel: string;
  designName: string;
  kind: RunKind;
  status: RunStatus;
  startedAt: string | null;
  endedAt: string | null;
  pointCount: number;
  plannedCount: number;
  simulated: boolean;
  /** The bench that drove the run; '' for runs stored before benches had names. */
  benchName: string;
  /** The process that has claimed the run (while it is driven, or left behind by one that died); null when none has. */
  owner: RunOwner | null;
}

/** A time the bench driving a run could not reach its store and kept the points in its local outbox (ISO 8601 instants). */
export interface OfflinePeriod {
  from: string;
  to: string;
}

export interface RunEvent {
  at: string;
  level: 'info' | 'warning' | 'error';
  message: string;
}

/** A sweep run (AC or DC) with its points, theory and figures; a noise run's is NoiseRunDetail (getNoiseRun). */
export interface RunDetail extends RunSummary {
  kind: SweepKind;
  request: SweepRequest;
  bench: InstrumentInfo[];
  softwareVersion: string;
  points: PointColumns;
  theory: TheoryColumns;
  figures: RunFigures;
  verdict: Verdict | null;
  events: RunEvent[];
  /** When the bench could not reach the store during the run, oldest first; [] when it never lost it. */
  offlinePeriods: OfflinePeriod[];
  theoryGainLimitHz?: number;
  theoryMinus3dbHz: number[];
}

export interface Comparison {
  runs: RunDetail[];
  referenceRunId: number | 'theory';
  /** Per run: stimulus and measured − reference, in dB. */
  differences: Array<{ runId: number; stimulus: number[]; deltaDb: number[] }>;
  figureTable: Array<{ runId: number; label: string; figures: RunFigures; deltas: Partial<Record<keyof RunFigures, number>>; verdict: Verdict | null }>;
}

export const RECORD_FORMATS = ['pdf', 'html', 'csv', 'json'] as const;
export type RecordFormat = (typeof RECORD_FORMATS)[number];

export interface ExportedRecord {
  fileName: string;
  mimeType: string;
  /** Base64 for PDF, text otherwise. */
  content: string;
  encoding: 'base64' | 'utf8';
}

export interface RunProgress {
  runId: number;
  step: number;
  total: number;
  etaS: number;
  status: RunStatus;
}

export interface TrafficLine {
  at: string;
  role: InstrumentRole | 'other';
  direction: 'sent' | 'received';
  text: string;
}

export type { ServiceEventName, ServiceEvents } from './events';
export type { StoreInUse, DatabaseSource } from './store-choice';
export * from './noise';
export { SERVICE_EVENT_NAMES } from './events';

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

/** The methods the host answers itself rather than the service (app/host/switchable-service.ts). */
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
  exportRecord: [required('runIds', RunIdListSchema), required('format', oneOf(RECORD_FORMATS))],
  storeInUse: [],
  chooseStore: [required('location', StoreLocationSchema)],
};
