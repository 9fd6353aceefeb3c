/**
 * The service as a host in its own process sees it: the window's contract
 * (ServiceApi, every call of which also crosses IPC and HTTP) plus what only
 * makes sense beside the service — closing it, waiting for a run, the bench
 * clock and stimulus limit in force, resuming with other instrument
 * addresses, schedules. The CLI is written against this and nothing more: the
 * store behind the service is not part of it, so no command can write around
 * the service's checks, ownership and events.
 */
import type { BenchClock } from '../bench';
import type {
  BenchIdentity, BenchStatus, BuildRecord, ConnectRequest, ExportedRecord, RecordFormat, ResumeRequest, RolloffClient,
  RunStatus, RunSummary, ServiceApi, ServiceEventName, ServiceEvents, StimulusLimit, SweepPlanSummary, SweepRequest,
} from '../contract/contract';
import type { ResumedRun } from './runs';
import type { ScheduleInput, ScheduleReport } from './schedules';

export interface LocalService extends ServiceApi {
  // ── Lifetime and events ──
  /** Pauses active runs (resumable), closes instruments, the simulated bench and the store. */
  close(): Promise<void>;
  /** Subscribe to one event; returns the unsubscribe function. */
  on<E extends ServiceEventName>(event: E, listener: (payload: ServiceEvents[E]) => void): () => void;
  /** The service as the client object views use (in-process hosts). */
  asClient(): RolloffClient;

  // ── The bench in force ──
  /** This bench's name (--bench, ROLLOFF_BENCH or the host name). */
  readonly benchName: string;
  /** The bench whose settings are in force, once known. */
  readonly bench: BenchIdentity | undefined;
  /** Scaled for a simulated bench so settling and integration run faster, real otherwise. */
  readonly clock: BenchClock;
  /** The maximum stimulus in force (Vpp), or undefined while none is set for the bench. */
  readonly maxStimulus: number | undefined;
  /** The limit in force with its bench and when it was set; undefined while none is saved. */
  readonly stimulusLimit: StimulusLimit | undefined;
  /** Where the runs are stored (the --db value: a file path, or a database URL without its password). */
  readonly databaseLocation: string;
  /** A simulated bench of one build's actual circuit (its measured part values), connected in all three roles. */
  startSimulatedBenchForBuild(buildId: number): Promise<BenchStatus>;

  // ── Designs and runs, beyond the window's calls ──
  getBuild(buildId: number): Promise<BuildRecord>;
  /** The plan for a design file and measured values not stored yet: a bad request is refused before anything is stored. */
  planForUnsavedBuild(request: SweepRequest, design: unknown, actualValues: Record<string, number>): SweepPlanSummary;
  /** resumeRun with instruments at other addresses than the run was measured with, and the step it continues at. */
  resumeRunWith(runId: number, extra?: ResumeRequest & { instruments?: ConnectRequest[] }): Promise<ResumedRun>;
  /** Resolves when a run started or resumed by this service leaves the running state. */
  waitForRun(runId: number): Promise<RunStatus>;
  /** Runs left running or paused that nobody drives: offered for resume. */
  interruptedRuns(): Promise<RunSummary[]>;
  /** The build's diode model (log stage), for comparing a DC fit with theory. */
  diodeOfRun(runId: number): Promise<{ n: number; isA: number; rsOhm: number } | undefined>;
  /** exportRecord against a chosen reference (a run id, or the theory). */
  exportRecord(runIds: number[], format: RecordFormat, reference?: number | 'theory'): Promise<ExportedRecord>;
  /** Repeats a sweep on a timetable; resolves with every run and the drift of the figures across them. */
  runSchedule(input: ScheduleInput, onRun?: (summary: RunSummary, index: number, slotS: number) => void): Promise<ScheduleReport>;
}
