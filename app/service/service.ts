/**
 * The one service: implements RolloffApi for the window hosts and the CLI, and
 * pushes ServiceEvents to whoever listens. A facade over one part per concern,
 * each given only what it needs:
 * - bench-control.ts: the instruments, their reconnects, the maximum stimulus in force, the simulated bench;
 * - runs.ts: start, pause, stop, resume (run-launch.ts drives a run, run-kinds.ts is what each kind of run does;
 *   noise-run.ts plans, starts and drives noise runs);
 * - sweep-planning.ts: plans for the bench in force;
 * - schedules.ts: repeated sweeps;
 * - history.ts: the stored runs as the views and records read them;
 * - designs.ts: designs and builds.
 */
import type { RolloffStore } from '../store';
import { resolveBenchName, type BenchClock } from '../bench';
import { listPorts } from '../scpi/ports';
import type {
  NoisePlanSummary, NoiseRequest, NoiseRunDetail,
  BenchIdentity, BenchStatus, BuildRecord, Comparison, ConnectRequest, ProfileCheckReport, ProfileCheckRequest, DesignRecord, ExportedRecord, InstrumentInfo, InstrumentRole,
  PortListing, ProfileSummary, RecordFormat, ResumeRequest, RolloffClient, RunDetail, RunFilter, RunStatus, RunSummary, ServiceEventName,
  ServiceEvents, SweepPlanSummary, SweepRequest, TemplateInfo,
} from '../contract/contract';
import { ServiceEventBus } from '../contract/event-bus';
import type { StoreChangeFeed } from '../store/types';
import { followLabChanges } from './lab-changes';
import type { SimulatedBenchHandle } from './simulated-bench';
import { BenchControl } from './bench-control';
import { SweepPlanning } from './sweep-planning';
import { Runs, type ResumedRun } from './runs';
import { RunHistory } from './history';
import { Designs } from './designs';
import { runSchedule, type ScheduleInput, type ScheduleReport } from './schedules';
import { STALE_AFTER_MS, thisProcessClaimant } from './run-ownership';
import type { RolloffServiceOptions } from './service-options';
import type { LocalService } from './local-service';

export type { RolloffServiceOptions } from './service-options';
export type { LocalService } from './local-service';
export type { ScheduleReport } from './schedules';

export class RolloffService implements LocalService {
  /** Only the service reaches the store: hosts go through the contract (LocalService), so no write skips its checks. */
  private readonly store: RolloffStore;
  readonly events = new ServiceEventBus();
  /** This bench's name (--bench, ROLLOFF_BENCH or the host name). */
  readonly benchName: string;
  private readonly benchControl: BenchControl;
  private readonly planning: SweepPlanning;
  private readonly runs: Runs;
  private readonly history: RunHistory;
  private readonly designs: Designs;
  private labFeed: StoreChangeFeed | undefined;

  private constructor(store: RolloffStore, options: RolloffServiceOptions) {
    this.store = store;
    this.benchName = options.benchName ?? resolveBenchName(undefined);
    const emit = this.events.emit.bind(this.events);
    const staleAfterMs = options.staleAfterMs ?? STALE_AFTER_MS;
    this.benchControl = new BenchControl(store, options, this.benchName, emit);
    this.planning = new SweepPlanning(store, this.benchControl, options);
    this.history = new RunHistory(store, staleAfterMs);
    this.designs = new Designs(store);
    this.runs = new Runs({
      store, bench: this.benchControl, planning: this.planning, history: this.history, options, benchName: this.benchName,
      claimant: thisProcessClaimant(options.ownerLabel ?? 'rolloff'), staleAfterMs, emit,
    });
  }

  /** The service over an open store, which it owns from now on (close() closes it). */
  static async open(store: RolloffStore, options: RolloffServiceOptions = {}): Promise<RolloffService> {
    const service = new RolloffService(store, options);
    if (options.startOn) await service.benchControl.limits.enter({ name: service.benchName, simulated: options.startOn === 'simulated bench' });
    if (options.followLab) {
      const feedOptions = options.followLab === true ? {} : options.followLab;
      service.labFeed = await followLabChanges({ store, drivesRun: (runId) => service.runs.drives(runId), emit: (event, payload) => service.events.emit(event, payload), ...feedOptions });
    }
    return service;
  }

  /** How sweeps of other processes reach this service: pushed by the server, polled, or not at all (a store of one process). */
  get labChanges(): 'listen' | 'poll' | 'off' {
    return this.labFeed?.mode ?? 'off';
  }

  /** Subscribe to one event; returns the unsubscribe function (RolloffClient.on). */
  on<E extends ServiceEventName>(event: E, listener: (payload: ServiceEvents[E]) => void): () => void {
    return this.events.on(event, listener);
  }

  /** The service as a client object (the CLI and in-process hosts). */
  asClient(): RolloffClient {
    return this as unknown as RolloffClient;
  }

  /** The bench clock: scaled for a simulated bench so settling and integration run faster, real otherwise. */
  get clock(): BenchClock {
    return this.benchControl.clock;
  }

  /** The maximum stimulus in force (Vpp), or undefined while none is set for the bench. */
  get maxStimulus(): number | undefined {
    return this.benchControl.limits.maxStimulusVpp;
  }

  /** The limit in force with its bench and when it was set (reused or set now); undefined while none is saved. */
  get stimulusLimit() {
    return this.benchControl.limits.current;
  }

  /** The bench whose settings are in force, once known. */
  get bench(): BenchIdentity | undefined {
    return this.benchControl.limits.currentBench;
  }

  /** Stops sweeps (paused, resumable), closes instruments, the simulated bench and the store. */
  async close(): Promise<void> {
    await this.runs.pauseAll();
    await this.benchControl.close();
    await this.labFeed?.stop();
    await this.store.close();
  }

  // ── Bench (changes to it wait until no run uses it) ────────────────────

  async listPorts(): Promise<PortListing> {
    return listPorts();
  }

  async listProfiles(): Promise<ProfileSummary[]> {
    return this.benchControl.listProfiles();
  }

  async benchStatus(): Promise<BenchStatus> {
    return this.benchControl.status();
  }

  async connect(request: ConnectRequest): Promise<InstrumentInfo> {
    this.runs.requireIdleBench();
    return this.benchControl.connect(request);
  }

  async checkProfile(request: ProfileCheckRequest): Promise<ProfileCheckReport> {
    this.runs.requireIdleBench();
    return this.benchControl.checkProfile(request);
  }

  async disconnect(role: InstrumentRole): Promise<void> {
    if (this.benchControl.isConnected(role)) this.runs.requireIdleBench();
    await this.benchControl.disconnect(role);
  }

  async startSimulatedBench(designId: number): Promise<BenchStatus> {
    this.runs.requireIdleBench();
    await this.benchControl.simulateDesign(designId);
    return this.benchStatus();
  }

  /** A simulated bench simulating one build's actual circuit (its measured part values), connected in all three roles. */
  async startSimulatedBenchForBuild(buildId: number): Promise<BenchStatus> {
    this.runs.requireIdleBench();
    await this.benchControl.simulateBuild(buildId);
    return this.benchStatus();
  }

  /** Fault injection on the running simulated bench (tests, demos). */
  get simulatedBench(): SimulatedBenchHandle | undefined {
    return this.benchControl.simulatedBench;
  }

  /** Saves the limit as the setting of the bench in force (before any bench is known: of the first one used). */
  async setMaxStimulus(maxStimulusVpp: number): Promise<BenchStatus> {
    this.runs.requireIdleBench();
    return this.benchControl.setMaxStimulus(maxStimulusVpp);
  }

  // ── Designs and builds ─────────────────────────────────────────────────

  async listTemplates(): Promise<TemplateInfo[]> {
    return this.designs.listTemplates();
  }

  async makeTemplate(templateId: string, parameters: Record<string, number>): Promise<unknown> {
    return this.designs.makeTemplate(templateId, parameters);
  }

  async saveDesign(design: unknown): Promise<DesignRecord> {
    return this.designs.saveDesign(design);
  }

  async listDesigns(): Promise<DesignRecord[]> {
    return this.designs.listDesigns();
  }

  async createBuild(build: { designId: number; label: string; notes: string; actualValues: Record<string, number> }): Promise<BuildRecord> {
    return this.designs.createBuild(build);
  }

  async listBuilds(designId?: number): Promise<BuildRecord[]> {
    return this.designs.listBuilds(designId);
  }

  async getBuild(buildId: number): Promise<BuildRecord> {
    return this.designs.getBuild(buildId);
  }

  /** Where the runs are stored (the --db value: a file path or a database URL). */
  get databaseLocation(): string {
    return this.store.location;
  }

  /** The runs this service drives now (the host refuses to reopen it on another store meanwhile). */
  get drivenRunIds(): number[] {
    return this.runs.drivenRunIds;
  }

  /** Refuses while a run of this service is active or being started. */
  requireIdleBench(): void {
    this.runs.requireIdleBench();
  }

  // ── Sweeps ─────────────────────────────────────────────────────────────

  async planSweep(request: SweepRequest): Promise<SweepPlanSummary> {
    return this.planning.planSweep(request);
  }

  /**
   * The plan for a design file and measured values that are not stored yet:
   * lets a caller refuse a bad request before storing anything.
   */
  planForUnsavedBuild(request: SweepRequest, design: unknown, actualValues: Record<string, number>): SweepPlanSummary {
    return this.planning.planForUnsavedBuild(request, design, actualValues);
  }

  async startRun(request: SweepRequest): Promise<RunSummary> {
    return this.startRunWith(request);
  }

  /** startRun with the service-only options (schedule id). */
  async startRunWith(request: SweepRequest, extra: { scheduleId?: number } = {}): Promise<RunSummary> {
    return this.runs.startRunWith(request, extra);
  }

  // ── Noise runs (app/service/noise-run.ts) ──────────────────────────────

  async planNoiseRun(request: NoiseRequest): Promise<NoisePlanSummary> {
    return this.runs.planNoiseRun(request);
  }

  async startNoiseRun(request: NoiseRequest): Promise<RunSummary> {
    return this.runs.startNoiseRun(request);
  }

  async getNoiseRun(runId: number): Promise<NoiseRunDetail> {
    return this.history.getNoiseRun(runId);
  }

  async pauseRun(runId: number): Promise<RunSummary> {
    return this.runs.pauseRun(runId);
  }

  async stopRun(runId: number): Promise<RunSummary> {
    return this.runs.stopRun(runId);
  }

  /**
   * Continues a run at its next step. A simulated run gets a fresh simulated
   * bench of its build; a real one reconnects to the addresses it was measured
   * with unless instruments are already connected.
   */
  async resumeRun(runId: number, request: ResumeRequest = {}): Promise<RunSummary> {
    return (await this.resumeRunWith(runId, request)).run;
  }

  /** resumeRun, with instruments at other addresses than the run was measured with (CLI --generator …), and the step it continues at. */
  async resumeRunWith(runId: number, extra: ResumeRequest & { instruments?: ConnectRequest[] } = {}): Promise<ResumedRun> {
    return this.runs.resumeRunWith(runId, extra);
  }

  /** Resolves when a run started or resumed by this service leaves the running state. */
  async waitForRun(runId: number): Promise<RunStatus> {
    return this.runs.waitForRun(runId);
  }

  /**
   * Runs left running or paused that nobody drives (no owner, a stale heartbeat,
   * or an owner process gone on this host, killed a moment ago): offered for resume.
   */
  async interruptedRuns(): Promise<RunSummary[]> {
    return this.runs.interruptedRuns();
  }

  // ── History, Compare, Record ───────────────────────────────────────────

  /** Newest first, each with who drives it (RunSummary.owner: live or not, heartbeat age). */
  async listRuns(filter?: RunFilter): Promise<RunSummary[]> {
    return this.history.listRuns(filter);
  }

  async getRun(runId: number): Promise<RunDetail> {
    return this.history.getRun(runId);
  }

  /** A run's summary, without the analysis getRun does. */
  async getRunSummary(runId: number): Promise<RunSummary> {
    return this.history.summary(runId);
  }

  /** The build's diode model (log stage), for comparing a DC fit with theory. */
  async diodeOfRun(runId: number): Promise<{ n: number; isA: number; rsOhm: number } | undefined> {
    return this.history.diodeOfRun(runId);
  }

  async compareRuns(runIds: number[], reference: number | 'theory'): Promise<Comparison> {
    return this.history.compareRuns(runIds, reference);
  }

  async exportRecord(runIds: number[], format: RecordFormat, reference: number | 'theory' = 'theory'): Promise<ExportedRecord> {
    return this.history.exportRecord(runIds, format, reference);
  }

  // ── Schedules (CLI; each repetition is an ordinary run of the same build) ──

  /**
   * Repeats a sweep every `everyMinutes` (bench time: scaled on a simulated bench),
   * `count` times or until the wall-clock time `until`, whichever comes first.
   * Resolves with every run and the drift of the figures across them.
   */
  async runSchedule(
    input: ScheduleInput,
    /** Called as each repetition starts, with the bench time (s) its slot began. */
    onRun?: (summary: RunSummary, index: number, slotS: number) => void,
  ): Promise<ScheduleReport> {
    return runSchedule({ store: this.store, clock: () => this.clock, startRunWith: (r, extra) => this.startRunWith(r, extra), waitForRun: (id) => this.waitForRun(id) }, input, onRun);
  }
}
