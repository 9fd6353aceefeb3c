/**
 * The one API contract between the window (renderer) and the service. The
 * Electron preload bridge and the headless web host both carry exactly these
 * methods and events, so the renderer never knows which one it talks to.
 *
 * Pure types only: no imports from node:*, Electron or the DOM. Data crossing
 * the boundary is plain JSON; numeric series are arrays of numbers in columnar
 * form ([xs, ys, …]) so they go straight into uPlot.
 *
 * Owner: app/service. Extend it when a view needs something new; every method
 * must also be reachable from the CLI.
 */

export type RunKind = 'ac' | 'dc';
export type RunStatus = 'planned' | 'running' | 'paused' | 'done' | 'stopped' | 'failed';
export type InstrumentRole = 'generator' | 'meter' | 'scope';

/** Every instrument role, in the order a bench lists them. */
export const INSTRUMENT_ROLES: readonly InstrumentRole[] = ['generator', 'meter', 'scope'];

export interface PortInfo {
  path: string;
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

export interface BenchStatus {
  instruments: InstrumentInfo[];
  /** The user's ceiling on generator output, peak-to-peak volts; never exceeded. */
  maxStimulusVpp: number;
  /** Set when a simulated bench is running, with the addresses it answers on. */
  simulatedBench?: { addresses: Partial<Record<InstrumentRole, string>>; designName: string };
}

export interface ConnectRequest {
  role: InstrumentRole;
  address: string;
  profileId: string;
}

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
  name: string;
  /** The design file's JSON (see app/circuit for its schema). */
  design: unknown;
  createdAt: string;
}

export interface BuildRecord {
  id: number;
  designId: number;
  label: string;
  notes: string;
  /** Measured part values by part id, SI units. */
  actualValues: Record<string, number>;
  createdAt: string;
}

export interface SweepRequest {
  buildId: number;
  kind: RunKind;
  /** AC: frequency limits in Hz; DC: input level limits in volts. */
  from: number;
  to: number;
  pointsPerDecade: number;
  spacing: 'log' | 'linear';
  /** Fixed stimulus, or chosen per point from theory to stay linear. */
  amplitude: { mode: 'fixed'; vpp: number } | { mode: 'auto'; targetOutputVpp?: number };
  measurement: 'scope' | 'meter';
  minCycles: number;
  averages: number;
  refine: boolean;
  operator: string;
  notes: string;
  /** Optional pass/fail limits. */
  limits?: VerdictLimits;
  /**
   * Through-calibration (meter runs): the stage is bypassed and the generator
   * measured directly; the result is stored as the bench's calibration and
   * applied to later meter runs.
   */
  through?: boolean;
  /** The maximum stimulus in force when the run was made (Vpp); the service fills it in and records it. */
  maxStimulusVpp?: number;
}

export interface VerdictLimits {
  /** Largest allowed |measured − theory| in dB over the pass band. */
  maxDeviationDb?: number;
  /** Allowed relative error of each −3 dB frequency. */
  cornerTolerance?: number;
  /** Pass-band gain window in dB. */
  passbandGainDb?: [number, number];
}

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
  /** DC runs: fitted log-stage parameters with 95 % intervals. */
  logFit?: { n: number; nCi: [number, number]; isA: number; isCi: [number, number]; rsOhm: number; rsCi: [number, number] };
}

export interface Verdict {
  pass: boolean;
  reasons: string[];
}

export interface RunSummary {
  id: number;
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
}

export interface RunEvent {
  at: string;
  level: 'info' | 'warning' | 'error';
  message: string;
}

export interface RunDetail extends RunSummary {
  request: SweepRequest;
  bench: InstrumentInfo[];
  softwareVersion: string;
  points: PointColumns;
  theory: TheoryColumns;
  figures: RunFigures;
  verdict: Verdict | null;
  events: RunEvent[];
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

export type RecordFormat = 'pdf' | 'html' | 'csv' | 'json';

export const RECORD_FORMATS: readonly RecordFormat[] = ['pdf', 'html', 'csv', 'json'];

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

/** Events pushed from the service to every connected window. */
export interface ServiceEvents {
  progress: RunProgress;
  point: { runId: number; index: number; stimulus: number; gainDb: number; phaseDeg: number; outputV: number; flags: number; gainUncertaintyDb: number; phaseUncertaintyDeg: number };
  runEvent: { runId: number } & RunEvent;
  traffic: TrafficLine;
  bench: BenchStatus;
}

export type ServiceEventName = keyof ServiceEvents;

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

  // Designs and builds
  listTemplates(): Promise<TemplateInfo[]>;
  makeTemplate(templateId: string, parameters: Record<string, number>): Promise<unknown>;
  saveDesign(design: unknown): Promise<DesignRecord>;
  listDesigns(): Promise<DesignRecord[]>;
  createBuild(build: { designId: number; label: string; notes: string; actualValues: Record<string, number> }): Promise<BuildRecord>;
  listBuilds(designId?: number): Promise<BuildRecord[]>;

  // Sweeps
  planSweep(request: SweepRequest): Promise<SweepPlanSummary>;
  startRun(request: SweepRequest): Promise<RunSummary>;
  pauseRun(runId: number): Promise<RunSummary>;
  resumeRun(runId: number): Promise<RunSummary>;
  stopRun(runId: number): Promise<RunSummary>;

  // History, Compare, Record
  listRuns(filter?: { search?: string; status?: RunStatus; buildId?: number }): Promise<RunSummary[]>;
  getRun(runId: number): Promise<RunDetail>;
  compareRuns(runIds: number[], reference: number | 'theory'): Promise<Comparison>;
  exportRecord(runIds: number[], format: RecordFormat): Promise<ExportedRecord>;
}

export type RolloffMethodName = keyof RolloffApi;

/** The client a view uses: the API plus event subscription. */
export interface RolloffClient extends RolloffApi {
  on<E extends ServiceEventName>(event: E, listener: (payload: ServiceEvents[E]) => void): () => void;
}
